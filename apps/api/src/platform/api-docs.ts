import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import express from 'express';
import { declareRoutes, route, type DeclaredRoutes } from './route';

/** Swagger UI's own files, shipped with the app (nothing from a CDN). */
const SWAGGER_UI = dirname(createRequire(import.meta.url).resolve('swagger-ui-dist/package.json'));

const PAGE = `<!doctype html>
<html lang="en">
  <head>
    <meta charset="utf-8" />
    <meta name="viewport" content="width=device-width, initial-scale=1" />
    <title>Tierscope API</title>
    <link rel="stylesheet" href="/api/docs/swagger-ui.css" />
  </head>
  <body>
    <div id="swagger-ui"></div>
    <script src="/api/docs/swagger-ui-bundle.js"></script>
    <script src="/api/docs/start.js"></script>
  </body>
</html>
`;

/** Same-origin script (the page's CSP allows no inline script): Swagger UI on this API's document. */
const START = `window.ui = SwaggerUIBundle({
  url: '/api/v1/openapi.json',
  dom_id: '#swagger-ui',
  deepLinking: true,
  presets: [SwaggerUIBundle.presets.apis],
});
`;

/**
 * The API document rendered by Swagger UI at /api/docs, from the package's files served by the API itself;
 * mounted under /api.
 */
export function apiDocsRoutes(): DeclaredRoutes & { files: express.RequestHandler } {
  return {
    ...declareRoutes('API document', [
      route({
        method: 'get',
        path: '/docs',
        summary: 'This API, to read and try in the browser (Swagger UI)',
        access: 'public',
        answer: 'text/html',
        handle: ({ res }) => {
          res.type('html').send(PAGE);
        },
      }),
      route({
        method: 'get',
        path: '/docs/start.js',
        summary: "The docs page's start script",
        access: 'public',
        answer: 'text/javascript',
        handle: ({ res }) => {
          res.type('text/javascript').send(START);
        },
      }),
    ]),
    files: express.static(SWAGGER_UI, { index: false, maxAge: '1h' }),
  };
}
