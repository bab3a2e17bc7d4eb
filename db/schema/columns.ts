import { datetime, int } from 'drizzle-orm/mysql-core';

/* Column helpers every table shares. Times are UTC with milliseconds (the server runs at +00:00). */

export const id = () => int('id').autoincrement().primaryKey();
export const utc = (name: string) => datetime(name, { mode: 'date', fsp: 3 });
export const createdAt = () => utc('created_at').notNull().$defaultFn(() => new Date());
export const updatedAt = () =>
  utc('updated_at')
    .notNull()
    .$defaultFn(() => new Date())
    .$onUpdateFn(() => new Date());
export const version = () => int('version').notNull().default(1);
