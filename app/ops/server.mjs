// The production web server: Express in front of the React Router build, like
// `react-router-serve`, plus what the app needs from the connection itself:
// - the client's address for the sign-in limiter, from the socket, or from the
//   proxy's X-Forwarded-For only when TRUST_PROXY says which proxies to believe
//   (Express's "trust proxy" values: "loopback", an address or CIDR list, or a hop count);
// - security headers on the static files too (the app sets them on everything else);
// - `Retry-After` on every 503 that lacks one: the framework drops the headers of a response
//   thrown in middleware, so the "try again in a moment" page during a database outage gets it here.
// Usage: node app/ops/server.mjs build/server/index.js   (PORT, HOST from the environment)
import path from "node:path";
import url from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import morgan from "morgan";
import { RouterContextProvider } from "react-router";

const buildPath = path.resolve(process.argv[2] ?? "build/server/index.js");
const build = await import(url.pathToFileURL(buildPath).href);
const clientAddressContext = build.entry.module.clientAddressContext;
if (!clientAddressContext) throw new Error("The server build does not export clientAddressContext from its entry.server.");

function trustProxy(value) {
  if (!value || value === "false" || value === "0") return false;
  if (/^\d+$/.test(value)) return Number(value);
  return value.split(",").map((s) => s.trim()).filter(Boolean);
}

const staticHeaders = (res) => {
  res.setHeader("X-Content-Type-Options", "nosniff");
  res.setHeader("X-Frame-Options", "DENY");
  res.setHeader("Referrer-Policy", "strict-origin-when-cross-origin");
  res.setHeader("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'; sandbox");
};

/** Seconds a client should wait before trying again after a 503 (the app's own API answers say the same). */
const RETRY_AFTER_SECONDS = "5";

function retryAfterOn503(req, res, next) {
  const writeHead = res.writeHead;
  res.writeHead = function (status, ...rest) {
    const code = typeof status === "number" ? status : res.statusCode;
    if (code === 503 && !res.hasHeader("retry-after")) {
      const given = rest.find((r) => r && typeof r === "object");
      const has = given && (Array.isArray(given) ? given.some((h, i) => i % 2 === 0 && String(h).toLowerCase() === "retry-after") : Object.keys(given).some((k) => k.toLowerCase() === "retry-after"));
      if (!has) res.setHeader("Retry-After", RETRY_AFTER_SECONDS);
    }
    return writeHead.call(this, status, ...rest);
  };
  next();
}

const app = express();
app.disable("x-powered-by");
app.set("trust proxy", trustProxy(process.env.TRUST_PROXY));
app.use(compression());
const assets = path.join(path.dirname(buildPath), "..", "client");
app.use("/assets", express.static(path.join(assets, "assets"), { immutable: true, maxAge: "1y", setHeaders: staticHeaders }));
// The files at the top level (favicon, manifest, icons) all have a file extension; a page's address
// (/clients, /tubs/…) never does, so pages skip looking for a file on disk (two stat calls each).
const files = (serve) => (req, res, next) => (path.extname(req.path) ? serve(req, res, next) : next());
app.use(files(express.static(assets, { setHeaders: staticHeaders })));
app.use(files(express.static("public", { maxAge: "1h", setHeaders: staticHeaders })));
app.use(morgan("tiny"));
app.use(retryAfterOn503);
app.all(
  "*",
  createRequestHandler({
    build,
    mode: process.env.NODE_ENV,
    getLoadContext(req) {
      const context = new RouterContextProvider();
      context.set(clientAddressContext, req.ip ?? req.socket.remoteAddress ?? null);
      return context;
    },
  }),
);

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST;
const server = host ? app.listen(port, host) : app.listen(port);
server.on("listening", () => console.log(`[dipwell] http://${host ?? "localhost"}:${port}`));
// Headers must arrive promptly (slow-header attacks); bodies are limited by the app.
server.headersTimeout = 20_000;
server.requestTimeout = 120_000;
for (const signal of ["SIGTERM", "SIGINT"]) process.once(signal, () => server.close(() => process.exit(0)));
