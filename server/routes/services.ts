import type { Db } from '../../db/client';
import type { Clock } from '../clock';

/** What every route's services need: the database and the clock. */
export type Services = { db: Db; clock: Clock };
