import type { RequestHandler } from 'express';
import multer from 'multer';
import { AppError } from './errors';

/**
 * Runs a multer upload and turns every way a multipart body can be wrong into a 400 or 413 in the one
 * error shape: multer's own limits, and busboy's parse failures (no boundary, a body cut short, a part
 * without headers), which arrive as plain errors.
 */
export function handleUpload(
  upload: RequestHandler,
  describe: { field: string; tooLarge: string; tooMany?: string },
): RequestHandler {
  return (req, res, next) => {
    upload(req, res, (error: unknown) => {
      if (!error) {
        next();
        return;
      }
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE') {
          next(new AppError('payload_too_large', describe.tooLarge));
          return;
        }
        const isCountError =
          error.code === 'LIMIT_FILE_COUNT' || error.code === 'LIMIT_UNEXPECTED_FILE';
        next(
          new AppError(
            'validation_failed',
            isCountError && describe.tooMany ? describe.tooMany : 'The upload is not valid',
            [{ path: error.field ?? describe.field, message: error.message }],
          ),
        );
        return;
      }
      // busboy (under multer) reports a malformed body as a plain Error: the caller's input, not ours.
      const message = error instanceof Error ? error.message : 'Malformed multipart body';
      next(
        new AppError('validation_failed', 'The upload is not a valid multipart form', [
          { path: describe.field, message },
        ]),
      );
    });
  };
}
