/**
 * The HTTP server around Next's request handler: a request id per request (the `x-request-id` header,
 * kept in AsyncLocalStorage so every log line written while serving it carries it), one JSON access
 * log line per response, and a graceful shutdown: on SIGTERM/SIGINT stop accepting connections, let
 * the requests in flight finish (up to `graceMs`), then exit.
 */
import { AsyncLocalStorage } from "node:async_hooks";
import { randomUUID } from "node:crypto";
import http from "node:http";
import { format } from "node:util";
import type { Logger } from "pino";
import { requestIdFrom, safeUrl } from "../log/logger";

export const requestContext = new AsyncLocalStorage<{ reqId: string }>();

type Handler = (req: http.IncomingMessage, res: http.ServerResponse) => Promise<void> | void;

/** Routes console.* through the logger (Next and our route handlers write there), tagged with the request id. */
export function captureConsole(logger: Logger): void {
  const to = (level: "info" | "warn" | "error") => (...args: unknown[]) => {
    const reqId = requestContext.getStore()?.reqId;
    const error = args.find((a): a is Error => a instanceof Error);
    const fields = { ...(reqId ? { reqId } : {}), ...(error ? { err: error } : {}) };
    logger[level](fields, format(...args));
  };
  console.log = to("info");
  console.info = to("info");
  console.warn = to("warn");
  console.error = to("error");
}

export function serve({ handler, port, hostname, logger, graceMs = 25_000, onClosed }: { handler: Handler; port: number; hostname?: string; logger: Logger; graceMs?: number; onClosed?: () => void }) {
  let inFlight = 0;
  let stopping = false;
  const server = http.createServer((req, res) => {
    const reqId = requestIdFrom(req.headers["x-request-id"], randomUUID);
    const started = process.hrtime.bigint();
    inFlight++;
    res.setHeader("x-request-id", reqId);
    // While stopping, answered connections are not kept alive for another request.
    if (stopping) res.setHeader("connection", "close");
    res.on("close", () => {
      inFlight--;
      logger.info(
        {
          reqId,
          method: req.method,
          url: safeUrl(req.url ?? "/"),
          status: res.statusCode,
          ms: Number((Number(process.hrtime.bigint() - started) / 1e6).toFixed(1)),
          completed: res.writableFinished,
        },
        "request",
      );
    });
    requestContext.run({ reqId }, () => {
      Promise.resolve(handler(req, res)).catch((error: unknown) => {
        logger.error({ reqId, err: error }, "unhandled error while serving a request");
        if (!res.headersSent) {
          res.statusCode = 500;
          res.setHeader("content-type", "application/json");
          res.end(JSON.stringify({ error: { code: "internal", message: "Something went wrong on the server. Try again; if it keeps happening, tell your admin." } }));
        } else res.destroy();
      });
    });
  });

  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal, inFlight }, "stopping: no new connections; finishing the requests in flight");
    const force = setTimeout(() => {
      logger.warn({ inFlight }, `requests still running after ${graceMs} ms; closing their connections`);
      server.closeAllConnections();
    }, graceMs);
    force.unref();
    // Idle keep-alive connections would hold close() open; requests in flight are left to finish.
    const sweep = setInterval(() => server.closeIdleConnections(), 100);
    server.close(() => {
      clearInterval(sweep);
      clearTimeout(force);
      logger.info("stopped");
      onClosed?.();
    });
    server.closeIdleConnections();
  };

  for (const signal of ["SIGTERM", "SIGINT"] as const) process.on(signal, () => stop(signal));

  return new Promise<http.Server>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, hostname, () => resolve(server));
  });
}
