import { register } from 'node:module';

/*
 * Lets plain Node (scripts, the worker, the seed) import app modules marked `import 'server-only'`.
 * Next.js resolves that marker to an empty module on the server; outside Next it throws. Only that
 * one specifier is mapped; every other import resolves as usual.
 * Use: node --import tsx --import ./scripts/services/server-only-preload.mjs script.ts
 */

const hook = `
export async function resolve(specifier, context, next) {
  if (specifier === 'server-only') return { url: 'data:text/javascript,export%20%7B%7D', shortCircuit: true };
  return next(specifier, context);
}
`;

register(`data:text/javascript,${encodeURIComponent(hook)}`);
