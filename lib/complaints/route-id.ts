import { NotFoundError } from '../errors';

/* The complaint id in a route's path: anything but a plain positive whole number is "not found". Pure. */
export function complaintIdFrom(raw: string): number {
  if (!/^\d{1,9}$/.test(raw) || Number(raw) < 1) throw new NotFoundError('This complaint');
  return Number(raw);
}
