import { datetime, int } from 'drizzle-orm/mysql-core';
import { rowTime } from '../clock';

/*
 * Column helpers every table shares. Times are UTC with milliseconds (the server runs at +00:00).
 * created_at and updated_at follow the write path's clock (db/clock.ts), which is the server's own
 * except while the demo seed replays its stories.
 */

export const id = () => int('id').autoincrement().primaryKey();
export const utc = (name: string) => datetime(name, { mode: 'date', fsp: 3 });
export const createdAt = () => utc('created_at').notNull().$defaultFn(rowTime);
export const updatedAt = () => utc('updated_at').notNull().$defaultFn(rowTime).$onUpdateFn(rowTime);
export const version = () => int('version').notNull().default(1);
