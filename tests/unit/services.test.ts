// The local services say in one line what is wrong when they cannot start.
import net from "node:net";
import { describe, expect, it } from "vitest";
import { assertPortFree, waitForPort } from "~/ops/services";

describe("local services", () => {
  it("names a taken port and what could not start", async () => {
    const server = net.createServer().listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    const port = (server.address() as net.AddressInfo).port;
    try {
      await expect(assertPortFree(port, "PostgreSQL")).rejects.toThrow(
        new RegExp(`^Port ${port} on 127\\.0\\.0\\.1 is taken, so PostgreSQL cannot start\\.`),
      );
      await expect(waitForPort(port, "PostgreSQL", 2000)).resolves.toBeUndefined();
    } finally {
      server.close();
    }
  });

  it("accepts a free port", async () => {
    const server = net.createServer().listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    const port = (server.address() as net.AddressInfo).port;
    await new Promise((r) => server.close(r));
    await expect(assertPortFree(port, "the app")).resolves.toBeUndefined();
  });
});
