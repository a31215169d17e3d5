// Two misbehaving SMTP servers for the outbox's fault tests, speaking real SMTP
// over TCP on 127.0.0.1 (the mail catcher accepts everything, so it cannot play
// these parts):
// - a refusing server, which answers RCPT TO for refused addresses with
//   "550 5.1.1 mailbox unavailable" (RFC 5321 §4.2.3) and accepts the rest;
// - a silent server, which takes the connection and never answers, like a
//   server that hangs mid-conversation (for "the worker died mid-send").
import net from "node:net";

export type TestSmtp = { port: number; url: string; accepted: string[]; close: () => Promise<void> };

export async function refusingSmtp(refuse: (address: string) => boolean): Promise<TestSmtp> {
  const accepted: string[] = [];
  const sockets = new Set<net.Socket>();
  const server = net.createServer((socket) => {
    sockets.add(socket);
    socket.on("close", () => sockets.delete(socket));
    socket.on("error", () => {});
    let inData = false;
    let rcpt: string[] = [];
    let buffer = "";
    socket.write("220 refusing.test ESMTP\r\n");
    socket.on("data", (chunk) => {
      buffer += chunk.toString("latin1");
      let i: number;
      while ((i = buffer.indexOf("\r\n")) >= 0) {
        const line = buffer.slice(0, i);
        buffer = buffer.slice(i + 2);
        if (inData) {
          if (line === ".") {
            inData = false;
            accepted.push(...rcpt);
            socket.write(`250 2.0.0 Ok: queued as T${accepted.length}\r\n`);
          }
          continue;
        }
        const verb = line.slice(0, 4).toUpperCase();
        if (verb === "EHLO" || verb === "HELO") socket.write("250 refusing.test\r\n");
        else if (verb === "MAIL") (rcpt = []), socket.write("250 2.1.0 Ok\r\n");
        else if (verb === "RCPT") {
          const address = /<([^>]*)>/.exec(line)?.[1] ?? "";
          if (refuse(address)) socket.write("550 5.1.1 <" + address + ">: Recipient address rejected: mailbox unavailable\r\n");
          else rcpt.push(address), socket.write("250 2.1.5 Ok\r\n");
        } else if (verb === "DATA") (inData = true), socket.write("354 End data with <CR><LF>.<CR><LF>\r\n");
        else if (verb === "RSET") (rcpt = []), socket.write("250 2.0.0 Ok\r\n");
        else if (verb === "QUIT") socket.end("221 2.0.0 Bye\r\n");
        else socket.write("250 Ok\r\n");
      }
    });
  });
  return listen(server, sockets, accepted);
}

export async function silentSmtp(): Promise<TestSmtp & { connections: () => number; cut: () => void }> {
  const sockets = new Set<net.Socket>();
  const server = net.createServer((socket) => {
    sockets.add(socket);
    socket.on("close", () => sockets.delete(socket));
    socket.on("error", () => {});
  });
  const base = await listen(server, sockets, []);
  return { ...base, connections: () => sockets.size, cut: () => sockets.forEach((s) => s.destroy()) };
}

async function listen(server: net.Server, sockets: Set<net.Socket>, accepted: string[]): Promise<TestSmtp> {
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const port = (server.address() as net.AddressInfo).port;
  return {
    port,
    url: `smtp://127.0.0.1:${port}`,
    accepted,
    close: async () => {
      sockets.forEach((s) => s.destroy());
      await new Promise<void>((r) => server.close(() => r()));
    },
  };
}
