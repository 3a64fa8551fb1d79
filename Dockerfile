# Example image for docker-compose.example.yml: the API serving the built web app.
FROM node:20-bookworm-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
COPY apps/web/package.json apps/web/
COPY apps/api/package.json apps/api/
COPY libs/domain/package.json libs/domain/
COPY libs/contracts/package.json libs/contracts/
COPY db/package.json db/
COPY simulator/package.json simulator/
COPY mail-catcher/package.json mail-catcher/
COPY tests/package.json tests/
RUN npm ci --no-audit --no-fund
COPY . .
RUN npx ng build web

FROM node:20-bookworm-slim
WORKDIR /app
ENV NODE_ENV=production HOST=0.0.0.0 PORT=8080 WEB_DIST=/app/dist/web/browser
COPY --from=build /app /app
RUN mkdir -p /app/data && chown node:node /app/data
USER node
EXPOSE 8080
# The same heap setting as scripts/processes.ts (API_NODE_ARGS): it keeps big imports at ≈ 200 MB.
CMD ["node", "--max-old-space-size=512", "--import", "tsx", "apps/api/src/server.ts"]
