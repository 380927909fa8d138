import type { Db } from '@/db/client';

/** Runs the reminder job every `minutes` inside the server process (0 turns it off); returns a function that stops it. */
export function startReminderTimer(db: Db, minutes: number): () => void {
  if (!(minutes > 0)) return () => {};
  let running = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      // Loaded on first use: keeps the job's imports (mail, queries) out of the server's start-up.
      const { runReminders } = await import('./reminders');
      const sent = await runReminders(db, new Date());
      if (sent.dueReminders || sent.visitReminders) console.log(`[levelwire] reminders sent: ${sent.dueReminders} due, ${sent.visitReminders} visit`);
    } catch (e) {
      console.error('[levelwire] reminder job failed:', (e as Error).message);
    } finally {
      running = false;
    }
  };
  const timer = setInterval(() => void tick(), minutes * 60_000);
  timer.unref();
  return () => clearInterval(timer);
}
