/**
 * Preloaded into the `next start` process (`node --require scripts/peer-address.cjs`): stamps every
 * incoming request with the address of the socket it arrived on, in a header only this process can
 * set (any copy the client sent is dropped). Next itself exposes no socket address to route handlers
 * or server actions, and its X-Forwarded-For is whatever the client sent; lib/net/client-address.ts
 * trusts forwarded headers only when this address belongs to TRUSTED_PROXIES.
 */
"use strict";
const http = require("node:http");

const HEADER = "x-solvatlas-peer";
const emit = http.Server.prototype.emit;
http.Server.prototype.emit = function stampPeer(event, req, ...rest) {
  if (event === "request" && req && req.headers) {
    req.headers[HEADER] = (req.socket && req.socket.remoteAddress) || "unknown";
  }
  return emit.call(this, event, req, ...rest);
};
globalThis[Symbol.for("solvatlas.peer-stamped")] = true;
