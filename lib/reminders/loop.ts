import { openDueEffectivenessChecks } from '../capa/effectiveness-due';
import { runRemindersOnce } from './run';

/*
 * The worker's scheduled sweeps, beside the outbox: CAPA effectiveness checks whose period has run
 * are opened (their reviewers are mailed), then due-soon and overdue reminders are queued. Once at
 * start, then every intervalMs. A sweep that fails (database away) is logged and tried again at the
 * next tick; sweeps never overlap.
 */

export interface ReminderLoop {
  stop(): Promise<void>;
}

export function startReminderLoop(opts: { intervalMs: number; log?: (line: string) => void }): ReminderLoop {
  const log = opts.log ?? ((line: string) => console.log(line));
  let running: Promise<void> | null = null;
  let stopped = false;

  const sweep = () => {
    if (running || stopped) return;
    running = openDueEffectivenessChecks()
      .then((sweep) => {
        for (const o of sweep.opened) log(`effectiveness check opened: ${o.number}`);
        for (const f of sweep.failed) log(`effectiveness check of ${f.number} not opened: ${f.message}`);
      })
      .then(() => runRemindersOnce())
      .then((r) => {
        if (r.queued > 0) log(`reminders: ${r.queued} queued (${r.examined} items due soon or overdue)`);
      })
      .catch((err: unknown) => log(`reminders: ${err instanceof Error ? err.message : String(err)}`))
      .finally(() => {
        running = null;
      });
  };
  sweep();
  const timer = setInterval(sweep, opts.intervalMs);
  return {
    async stop() {
      stopped = true;
      clearInterval(timer);
      await running;
    },
  };
}
