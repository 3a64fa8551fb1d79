import { z } from 'zod';
import { endpoint } from './endpoint';
import { importStatusSchema, savedMappingCreateSchema, savedMappingSchema } from './import.schema';
import { farmPath, housePath, idParam } from './primitives.schema';

const listQuery = z.object({ farmId: idParam.optional() });
const importPath = z.object({ importId: idParam });

export const importsEndpoints = {
  start: endpoint({
    method: 'post',
    path: '/houses/:houseId/imports',
    summary:
      'Import a historical counter export (multipart: "file", and "mapping" as JSON text). Answers 202 with the queued import; it runs in the background',
    permission: 'imports.run',
    params: housePath,
    upload: z.object({
      file: z.file(),
      mapping: z.string().meta({ description: 'The column mapping as JSON text' }),
    }),
    status: 202,
    answer: importStatusSchema,
    errors: { 413: 'A file over IMPORT_MAX_BYTES', 415: 'Not a text (CSV) export' },
  }),
  list: endpoint({
    method: 'get',
    path: '/imports',
    summary: 'Recent imports of my farms (integrators and admins)',
    permission: 'imports.run',
    query: listQuery,
    answer: z.array(importStatusSchema),
  }),
  get: endpoint({
    method: 'get',
    path: '/imports/:importId',
    summary: 'An import: state, progress, counts and its first line errors',
    permission: 'imports.run',
    params: importPath,
    answer: importStatusSchema,
  }),
  cancel: endpoint({
    method: 'post',
    path: '/imports/:importId/cancel',
    summary: 'Cancel an import; readings already loaded are kept',
    permission: 'imports.run',
    params: importPath,
    answer: importStatusSchema,
    errors: { 409: 'Already ended' },
  }),
  retry: endpoint({
    method: 'post',
    path: '/imports/:importId/retry',
    summary: 'Run a failed import again from the start (its file is kept when it fails)',
    permission: 'imports.run',
    params: importPath,
    answer: importStatusSchema,
    errors: { 409: 'Not a failed import' },
  }),
  errorsCsv: endpoint({
    method: 'get',
    path: '/imports/:importId/errors.csv',
    summary: "An import's line errors as CSV (line, column, message)",
    permission: 'imports.run',
    params: importPath,
    answer: 'text/csv',
  }),
  mappings: endpoint({
    method: 'get',
    path: '/farms/:farmId/import-mappings',
    summary: 'Saved column mappings of a farm',
    permission: 'imports.run',
    params: farmPath,
    answer: z.array(savedMappingSchema),
  }),
  saveMapping: endpoint({
    method: 'post',
    path: '/farms/:farmId/import-mappings',
    summary: 'Save a mapping by name (the same name replaces it)',
    permission: 'imports.run',
    params: farmPath,
    body: savedMappingCreateSchema,
    status: 201,
    answer: savedMappingSchema,
  }),
  deleteMapping: endpoint({
    method: 'delete',
    path: '/import-mappings/:mappingId',
    summary: 'Delete a saved mapping',
    permission: 'imports.run',
    params: z.object({ mappingId: idParam }),
    status: 204,
  }),
};
