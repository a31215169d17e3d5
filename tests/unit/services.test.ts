// The local services say in one line what is wrong when they cannot start.
import net from "node:net";
import { describe, expect, it } from "vitest";
import { assertPortFree, superviseService, waitForPort } from "~/ops/services";

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

describe("the local supervisor (npm start)", () => {
  it("starts a child that dies again, says so, and waits longer each time instead of spinning", async () => {
    const lines: string[] = [];
    const started: number[] = [];
    const s = superviseService("crasher", process.execPath, ["-e", "process.exit(3)"], { cwd: process.cwd(), quiet: true, log: (l) => lines.push(l) });
    let last = s.current();
    started.push(Date.now());
    for (let i = 0; i < 2; i++) {
      last = await s.nextStart(last);
      started.push(Date.now());
    }
    await s.stop();
    expect(s.restarts()).toBe(2);
    expect(lines[0]).toBe("crasher exited with code 3; starting it again in 1 s.");
    expect(lines[1]).toBe("crasher exited with code 3; starting it again in 2 s.");
    // the pauses grow: 1 s, then 2 s (lower bounds only: a busy machine may be slower)
    expect(started[1] - started[0]).toBeGreaterThanOrEqual(1_000);
    expect(started[2] - started[1]).toBeGreaterThanOrEqual(2_000);
  });

  it("stops for good when asked, without starting the child again", async () => {
    const lines: string[] = [];
    const s = superviseService("sleeper", process.execPath, ["-e", "setTimeout(() => {}, 60000)"], { cwd: process.cwd(), quiet: true, log: (l) => lines.push(l) });
    await new Promise((r) => setTimeout(r, 200));
    await s.stop();
    await new Promise((r) => setTimeout(r, 1_200));
    expect(s.current()).toBeUndefined();
    expect(s.restarts()).toBe(0);
    expect(lines).toEqual([]);
  });
});
