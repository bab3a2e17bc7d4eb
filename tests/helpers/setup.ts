import { runThroughNpmTest } from './env';

// Fails every integration and browser test file at once, with one clear reason, instead of each
// test timing out against a database that is not there.
if (!process.env.DATABASE_URL) {
  throw new Error(`DATABASE_URL is not set. ${runThroughNpmTest}`);
}
