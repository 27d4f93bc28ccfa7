import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { fieldErrors, type ApiErrorBody } from '../../src/contracts/errors';
import { DatabaseUnwritable, unwritableReason } from '../../db/client';
import { HttpError } from '../http-error';

const body = (code: string, message: string, fields?: Record<string, string>): ApiErrorBody => ({
  error: fields ? { code, message, fields } : { code, message },
});

const UNWRITABLE_MESSAGE: Record<DatabaseUnwritable['reason'], string> = {
  locked: 'The database is locked by another program, so nothing was saved; reading still works. Try again in a minute.',
  full: 'The disk holding the database is full, so nothing was saved; reading still works. Tell your site admin.',
  'read-only': 'The database is read-only just now (a read-only file, or a standby server), so nothing was saved; reading still works. Tell your site admin.',
  io: 'The database could not be written (a disk error, or its server cannot be reached), so nothing was saved; reading still works while the database answers. Tell your site admin.',
};

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(body('not_found', `No API route ${req.method} ${req.path}`));
};

/** Last middleware: known errors keep their status; anything else is logged and becomes a bare 500. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (res.headersSent) return;
  if (err instanceof HttpError) {
    res.status(err.status).json(body(err.code, err.message, err.fields));
    return;
  }
  if (err instanceof DatabaseUnwritable) {
    // The transaction was rolled back; reads keep working and the next write that succeeds ends this state.
    res.set('retry-after', '10');
    res.status(503).json(body('database_unwritable', UNWRITABLE_MESSAGE[err.reason]));
    return;
  }
  // A read that met a lost database server (PostgreSQL restarting, a failover, a dropped link): nothing changed.
  if (unwritableReason(err) === 'io') {
    res.set('retry-after', '10');
    res.status(503).json(body('database_unavailable', 'The database cannot be reached just now; nothing was changed. Try again in a minute.'));
    return;
  }
  if (err instanceof ZodError) {
    res.status(400).json(body('invalid_input', 'Some fields are not valid', fieldErrors(err)));
    return;
  }
  // body-parser errors carry a status and a type; their messages are safe to show.
  const status = typeof err?.status === 'number' ? err.status : 500;
  if (status === 413) {
    res.status(413).json(body('too_large', 'The request body is too large'));
    return;
  }
  if (status === 400 && err?.type === 'entity.parse.failed') {
    res.status(400).json(body('invalid_json', 'The request body is not valid JSON'));
    return;
  }
  if (status >= 400 && status < 500) {
    res.status(status).json(body('bad_request', 'The request could not be read'));
    return;
  }
  console.error(`[${new Date().toISOString()}] ${req.method} ${req.originalUrl}`, err);
  res.status(500).json(body('internal', 'Something went wrong on the server; it has been logged'));
};
