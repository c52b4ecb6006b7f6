/** Next.js calls register() once when a server process starts, before it takes requests. */
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { releaseAbortReasonStacks } = await import("./lib/runtime/abort-reason");
    releaseAbortReasonStacks();
    // Due reminders and mail retries run on their own; one process at a time sends (lib/mail/scheduler.ts).
    const { ensureMailScheduler } = await import("./lib/mail/scheduler");
    ensureMailScheduler();
  }
}
