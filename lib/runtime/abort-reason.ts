/**
 * Keeps request contexts from outliving their requests in a busy web process.
 *
 * Found with heap snapshots under 50 concurrent page renders (DEVELOPERS.md, "Memory"): each process kept
 * about 100 MB more after 1,500 renders, and a 60 s load run took it past 1.5 GB. The chain: Next.js
 * aborts a per-request AbortController without a reason from inside a setImmediate callback; Node
 * creates the default reason, a DOMException whose captured stack trace (not yet formatted) refers
 * to that Immediate; Node leaves the links between the Immediates of one batch in place after
 * running them; and each Immediate carries the AsyncLocalStorage store of the request that made it.
 * So one reason still referenced (a kept-alive socket holds the last request's store) keeps every
 * request of its batch alive, with its response object and compression state.
 *
 * Reading a stack formats it and drops the captured frames, which breaks the chain at its first
 * link. It costs about 7 µs per abort (measured in a loop on the project's machine: 6.8 µs
 * without, 13.7 µs with), and Next.js aborts once per rendered page.
 */
const INSTALLED = Symbol.for("cairn.abortReasonStacksReleased");

export function releaseAbortReasonStacks(): void {
  const proto = AbortController.prototype as AbortController & { [INSTALLED]?: true };
  if (proto[INSTALLED]) return;
  const abort = proto.abort;
  proto.abort = function (this: AbortController, reason?: unknown) {
    abort.call(this, reason);
    const r: unknown = this.signal.reason;
    if (typeof r === "object" && r !== null && "stack" in r) void (r as { stack?: unknown }).stack;
  };
  Object.defineProperty(proto, INSTALLED, { value: true });
}
