#!/usr/bin/env node
/**
 * Serves the production build with several Node.js processes sharing one port (node:cluster).
 *   node scripts/serve.mjs [-p 3000] [-H 127.0.0.1] [--workers N]
 * One process answers about 700 interval questions a second on this machine, and with 50 clients
 * in flight that already puts the p95 near 100 ms (README, "Hardening"). A second process takes
 * requests while the first is busy. Everything the processes must agree on (calibration jobs,
 * sign-in throttling, the mail outbox) lives in MariaDB; what stays in a process is a cache.
 *
 * The primary restarts a worker that dies, and replaces one whose memory passes a ceiling: the
 * replacement starts first, then the old process stops taking connections, finishes what it has
 * and exits, so no request is refused. The ceiling is a safety net: the one retention found under
 * concurrent page renders is cut at its source (lib/runtime/abort-reason.ts, installed by
 * instrumentation.ts), and anything like it found later is still bounded. SIGTERM/SIGINT stop everything.
 *
 * Settings: --workers, else CAIRN_WEB_WORKERS, else the number of CPUs (at most 4);
 * CAIRN_WEB_MAX_RSS_MB (default 1536) per process; CAIRN_WEB_MEMORY_CHECK_MS (default 15000).
 */
import cluster from "node:cluster";
import { createServer } from "node:http";
import { availableParallelism } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";

function arg(names, fallback) {
  for (const name of names) {
    const i = process.argv.indexOf(name);
    if (i >= 0 && process.argv[i + 1]) return process.argv[i + 1];
  }
  return fallback;
}

const port = Number(arg(["-p", "--port"], process.env.PORT ?? "3000"));
const hostname = arg(["-H", "--hostname"], undefined);
const workers = Math.max(1, Number(arg(["--workers"], process.env.CAIRN_WEB_WORKERS ?? String(Math.min(4, availableParallelism())))));
const maxRssBytes = Number(process.env.CAIRN_WEB_MAX_RSS_MB ?? "1536") * 1024 * 1024;
const memoryCheckMs = Number(process.env.CAIRN_WEB_MEMORY_CHECK_MS ?? "15000");
const dir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

/** A worker that ends this soon after starting, this many times in a row, will not start (a missing build, say). */
const EARLY_EXIT_MS = 10_000;
const MAX_EARLY_EXITS = 5;
/** A process being replaced that still has requests in flight this long after it stopped taking connections is stopped anyway. */
const DRAIN_MS = 30_000;
const RECYCLE = "cairn:recycle";
const DRAIN = "cairn:drain";
/** Node's default server keep-alive timeout. */
const KEEP_ALIVE_MS = 5_000;

if (cluster.isPrimary) {
  let stopping = false;
  let earlyExits = 0;
  let replacing = false;
  const startedAt = new Map();
  /** Workers whose successor is already running. */
  const replaced = new Set();
  /** Successors not yet listening: if one ends, the process it was to replace simply stays. */
  const successors = new Set();
  const fork = () => {
    const w = cluster.fork({ CAIRN_WEB_WORKER: "1" });
    startedAt.set(w.id, Date.now());
    w.on("message", (msg) => {
      if (msg?.cmd === RECYCLE) replace(w, msg.rss);
    });
    return w;
  };
  // One replacement at a time, so the other processes keep answering meanwhile.
  const replace = (old, rss) => {
    if (replacing || stopping || !old.isConnected()) return;
    replacing = true;
    console.log(`[cairn] web process ${old.process.pid} uses ${Math.round(rss / 1048576)} MB; replacing it`);
    replaced.add(old.id);
    const fresh = fork();
    successors.add(fresh.id);
    const done = () => {
      replacing = false;
    };
    fresh.once("listening", () => {
      successors.delete(fresh.id);
      // Every kept-alive connection either carries one more request, answered with
      // "Connection: close", or stays idle past the server's keep-alive timeout and is closed
      // as usual; only then does the old process stop.
      old.send({ cmd: DRAIN });
      const disconnect = setTimeout(() => old.isConnected() && old.disconnect(), KEEP_ALIVE_MS + 1000);
      const kill = setTimeout(() => old.process.kill("SIGKILL"), KEEP_ALIVE_MS + 1000 + DRAIN_MS);
      old.once("exit", () => {
        clearTimeout(disconnect);
        clearTimeout(kill);
        done();
      });
    });
    fresh.once("exit", () => {
      replaced.delete(old.id);
      done();
    });
  };
  for (let i = 0; i < workers; i++) fork();
  cluster.on("listening", () => {
    earlyExits = 0;
  });
  cluster.on("exit", (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    const early = Date.now() - (startedAt.get(worker.id) ?? 0) < EARLY_EXIT_MS;
    startedAt.delete(worker.id);
    // A process replaced for its memory has its successor already; a successor that failed to
    // start leaves its predecessor serving (it asks again at its next memory check).
    if (replaced.delete(worker.id) || successors.delete(worker.id) || worker.exitedAfterDisconnect) return;
    earlyExits = early ? earlyExits + 1 : 0;
    if (earlyExits >= MAX_EARLY_EXITS) {
      console.error(`[cairn] web processes keep ending at start (last: ${signal ?? code}); giving up (see the messages above)`);
      stopping = true;
      for (const w of Object.values(cluster.workers ?? {})) w?.process.kill("SIGTERM");
      process.exitCode = 1;
      return;
    }
    console.error(`[cairn] web process ${worker.process.pid} ended (${signal ?? code}); starting another`);
    setTimeout(fork, 500);
  });
  const stop = () => {
    if (stopping) return;
    stopping = true;
    for (const w of Object.values(cluster.workers ?? {})) w?.process.kill("SIGTERM");
    setTimeout(() => process.exit(0), 5000).unref();
  };
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
  console.log(`[cairn] serving on port ${port} with ${workers} web process${workers === 1 ? "" : "es"}`);
} else {
  const { default: next } = await import("next");
  const app = next({ dev: false, dir, hostname, port });
  const handle = app.getRequestHandler();
  await app.prepare();
  // While a replaced process drains, each response tells its client to close the connection, so
  // that no client is left sending on a kept-alive connection that the process then closes.
  let draining = false;
  const server = createServer((req, res) => {
    if (draining) res.setHeader("Connection", "close");
    // The peer address the sign-in throttle counts per (lib/auth/client-address.ts); a client's own
    // value for this header is overwritten, never trusted.
    req.headers["x-cairn-peer"] = req.socket.remoteAddress ?? "";
    return handle(req, res);
  });
  server.listen(port, hostname);
  const memoryCheck = setInterval(() => {
    const rss = process.memoryUsage.rss();
    // Asked again at every check until the primary can take it (one replacement at a time).
    if (rss > maxRssBytes && process.connected) process.send({ cmd: RECYCLE, rss });
  }, memoryCheckMs);
  memoryCheck.unref();
  process.on("message", (msg) => {
    if (msg?.cmd !== DRAIN) return;
    draining = true;
    clearInterval(memoryCheck);
  });
  // Node's cluster closes the server first (in-flight requests finish), then disconnects: nothing
  // is left to answer, and the database pool must not keep the process alive.
  process.on("disconnect", () => process.exit(0));
  process.on("SIGTERM", () => {
    clearInterval(memoryCheck);
    server.close(() => process.exit(0));
    server.closeIdleConnections();
    setTimeout(() => process.exit(0), 3000).unref();
  });
  // A Ctrl-C in a terminal reaches every process of the group; the primary decides.
  process.on("SIGINT", () => {});
}
