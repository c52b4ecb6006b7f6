#!/usr/bin/env node
/**
 * Serves the production build with several Node.js processes sharing one port (node:cluster).
 *   node scripts/serve.mjs [-p 3000] [-H 127.0.0.1] [--workers N]
 * One process answers about 700 interval questions a second on this machine, and with 50 clients
 * in flight that already puts the p95 near 100 ms (README, "Hardening"). A second process takes
 * requests while the first is busy. Everything the processes must agree on (calibration jobs,
 * sign-in throttling, the mail outbox) lives in MariaDB; what stays in a process is a cache.
 * The primary restarts a worker that dies and stops them all on SIGTERM/SIGINT.
 * Workers: --workers, else CAIRN_WEB_WORKERS, else the number of CPUs (at most 4).
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
const dir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

/** A worker that ends this soon after starting, this many times in a row, will not start (a missing build, say). */
const EARLY_EXIT_MS = 10_000;
const MAX_EARLY_EXITS = 5;

if (cluster.isPrimary) {
  let stopping = false;
  let earlyExits = 0;
  const startedAt = new Map();
  const fork = () => {
    const w = cluster.fork({ CAIRN_WEB_WORKER: "1" });
    startedAt.set(w.id, Date.now());
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
  const server = createServer((req, res) => handle(req, res));
  server.listen(port, hostname);
  const stop = () => {
    server.close(() => process.exit(0));
    server.closeIdleConnections();
    setTimeout(() => process.exit(0), 3000).unref();
  };
  process.on("SIGTERM", stop);
  // A Ctrl-C in a terminal reaches every process of the group; the primary decides.
  process.on("SIGINT", () => {});
}
