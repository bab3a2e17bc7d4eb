/*
 * Where the test stack started by `npm test` (scripts/test.ts) lives. Tests read these instead of
 * hard-coding ports, so the stack can move (PLUMBLINE_TEST_*_PORT) without touching tests.
 */

export const runThroughNpmTest =
  'This test needs the services that `npm test` starts (MariaDB, S3 and SMTP fakes, the app). ' +
  'Run it through npm test, e.g. `npm test -- tests/integration/some.test.ts`.';

function required(name: string): string {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set. ${runThroughNpmTest}`);
  return value;
}

export const testStack = {
  get databaseUrl() {
    return required('DATABASE_URL');
  },
  get adminDatabaseUrl() {
    return required('DATABASE_ADMIN_URL');
  },
  /** Folder where the SMTP fake writes each message (.json + .eml). */
  get mailDir() {
    return required('PLUMBLINE_MAIL_DIR');
  },
  /** The app under test, on localhost (Auth.js builds its redirects from localhost). */
  get baseUrl() {
    return process.env.PLUMBLINE_E2E_BASE_URL ?? 'http://localhost:3100';
  },
};
