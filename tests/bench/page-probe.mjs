// The benchmark's page probe: one page requested back to back (request to last byte), in a
// process of its own, so the times it takes are the app's and not the benchmark's own work
// (sending fifty photos, following their readings). Driven over IPC by app.bench.ts:
//   { run: { url, cookie, origin } } starts the loop; { stop: true } ends it and answers { times }
//   and { starts } (each request's start, ms since the epoch, so the benchmark can tell phases apart).
let running = false;
let loop = Promise.resolve();
const times = [];
const starts = [];

async function once(url, cookie, origin) {
  starts.push(Date.now());
  const t0 = performance.now();
  const res = await fetch(url, { headers: { cookie, origin }, redirect: "manual" });
  await res.arrayBuffer();
  return performance.now() - t0;
}

process.on("message", async (m) => {
  if (m.run) {
    running = true;
    times.length = 0;
    starts.length = 0;
    const { url, cookie, origin } = m.run;
    loop = (async () => {
      while (running) times.push(await once(url, cookie, origin));
    })();
    process.send({ started: true });
  } else if (m.stop) {
    running = false;
    await loop;
    process.send({ times: [...times], starts: starts.slice(0, times.length) });
  } else if (m.exit) {
    process.exit(0);
  }
});
