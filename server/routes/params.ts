import { z } from 'zod';

/** A row id in a path (`/:id`, `/:vesselId`): a positive whole number, else 400 invalid_input naming the parameter. */
export const RowId = z.coerce.number().int().positive();

export const IdParam = z.object({ id: RowId });
