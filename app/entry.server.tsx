// Renders documents on the server. Differs from the framework's default only in
// the nonce: every inline script React and React Router write carries the
// response's nonce, which the Content-Security-Policy (app/lib/web-security.server.ts) allows.
import { Transform, type TransformCallback } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import { ServerRouter, type EntryContext, type RouterContextProvider } from "react-router";
import { enqueueEmail } from "./features/notify/outbox.server";
import { sendAccountMailWith } from "./lib/auth.server";
import { NonceContext } from "./lib/nonce";
import { nonceContext } from "./lib/web-security.server";

// Sign-in's account e-mails leave through the outbox, like every other e-mail.
sendAccountMailWith(enqueueEmail);

export const streamTimeout = 5_000;

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: RouterContextProvider,
) {
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  }
  const nonce = loadContext.get(nonceContext);

  return new Promise((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    const readyOption: keyof RenderToPipeableStreamOptions =
      (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    const { pipe, abort } = renderToPipeableStream(
      <NonceContext.Provider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceContext.Provider>,
      {
        nonce,
        [readyOption]() {
          shellRendered = true;
          const body = new Gathered(() => {
            clearTimeout(timeoutId);
            timeoutId = undefined;
          });
          const stream = createReadableStreamFromReadable(body);
          responseHeaders.set("Content-Type", "text/html");
          pipe(body);
          resolve(new Response(stream, { headers: responseHeaders, status: responseStatusCode }));
        },
        onShellError(error: unknown) {
          reject(error);
        },
        onError(error: unknown) {
          responseStatusCode = 500;
          if (shellRendered) console.error(error);
        },
      },
    );
  });
}

/**
 * Hands on what React writes as one chunk per turn of the event loop (React writes a page in
 * pieces of a few kilobytes, all in one go): each chunk costs a trip through the web stream, the
 * compressor's thread and a socket write, so a page goes out in one or two instead of dozens.
 * A large page still streams: a chunk goes as soon as 64 KB have gathered.
 */
class Gathered extends Transform {
  private parts: Buffer[] = [];
  private size = 0;
  private scheduled = false;
  private ended = false;
  constructor(private readonly onEnd: () => void) {
    super();
  }
  private send() {
    this.scheduled = false;
    if (!this.parts.length || this.ended) return;
    this.push(this.parts.length === 1 ? this.parts[0] : Buffer.concat(this.parts, this.size));
    this.parts = [];
    this.size = 0;
  }
  _transform(chunk: Buffer, _encoding: BufferEncoding, callback: TransformCallback) {
    this.parts.push(chunk);
    this.size += chunk.length;
    if (this.size >= 64 * 1024) this.send();
    else if (!this.scheduled) {
      this.scheduled = true;
      setImmediate(() => this.send());
    }
    callback();
  }
  _flush(callback: TransformCallback) {
    this.send();
    this.ended = true;
    this.onEnd();
    callback();
  }
}

// The web server (app/ops/server.mjs) puts each request's client address here.
export { clientAddressContext } from "./lib/context";
