/** Next.js calls register() once when a server process starts, before it takes requests. */
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { releaseAbortReasonStacks } = await import("./lib/runtime/abort-reason");
    releaseAbortReasonStacks();
  }
}
