import type { RequestHandler } from 'express';
import multer from 'multer';
import { HttpError } from '../http-error';

const mb = (bytes: number) => `${Math.round(bytes / 1024 / 1024)} MB`;

/**
 * One file from a multipart form field, kept in memory up to `maxBytes`; multer's errors become the API's.
 * A request that is not multipart passes through with no file, so the route can read a JSON body instead.
 */
export function singleFile(field: string, maxBytes: number): RequestHandler {
  const handler = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 10, fieldSize: 10_000 } }).single(field);
  return (req, res, next) => {
    handler(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, 'too_large', `The file is larger than ${mb(maxBytes)}`));
        return next(new HttpError(400, 'bad_upload', `Send one file in the form field "${field}"`));
      }
      next(new HttpError(400, 'bad_upload', 'The upload could not be read'));
    });
  };
}
