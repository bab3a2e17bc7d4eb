/*
 * The demo site calendar: closure targets by classification (critical 15, major 30, minor 30
 * calendar days: common practice, no published source; lib/clocks/due-dates.ts defaultDueDays) and
 * two site closures, a summer plant shutdown week and the day after Thanksgiving, which is a site
 * holiday at Brackwater but not a federal one.
 */

export const demoClosures: readonly { day: string; description: string }[] = [
  ...['2026-08-03', '2026-08-04', '2026-08-05', '2026-08-06', '2026-08-07'].map((day) => ({
    day,
    description: 'Summer plant shutdown (planned maintenance)',
  })),
  { day: '2026-11-27', description: 'Site holiday: day after Thanksgiving' },
];

/** "Today" for every clock is the day at the site, wherever the server runs. */
export const demoSiteTimeZone = 'America/Chicago';
