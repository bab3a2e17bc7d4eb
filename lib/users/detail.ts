import 'server-only';
import { db, type DbOrTx } from '../../db/client';
import type { Actor } from '../auth/permissions';
import { getVisibleRow } from '../records/write-path';
import { userKind } from './kind';
import type { UserDto } from './queries';

/** One account, if this person may see it (an administrator, or its holder); otherwise NotFoundError. */
export async function getVisibleUser(id: number, viewer: Actor, database: DbOrTx = db): Promise<UserDto> {
  return userKind.toDto(await getVisibleRow(database, userKind, id, viewer));
}
