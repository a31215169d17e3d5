// Fixed loopback ports, non-default so Dipwell never collides with a system
// PostgreSQL or another project's fakes. The test run has its own set, so
// `npm test` can run while `npm start` is serving.
export type Ports = { postgres: number; s3: number; smtp: number; mailWeb: number; app: number };

export const DEV_PORTS: Ports = { postgres: 54329, s3: 4569, smtp: 1026, mailWeb: 1081, app: 3000 };
/**
 * DIPWELL_TEST_SLOT (0-8) lets several test runs share one machine, each with
 * its own ports, cluster folder and build folder.
 */
export const TEST_SLOT = Math.min(8, Math.max(0, Number(process.env.DIPWELL_TEST_SLOT ?? 0) || 0));
export const TEST_PORTS: Ports = {
  postgres: 54339 + TEST_SLOT,
  s3: 4579 + TEST_SLOT,
  smtp: 1036 + TEST_SLOT,
  mailWeb: 1091 + TEST_SLOT,
  app: 3100 + TEST_SLOT,
};

/**
 * The fault tests (`npm run test:faults`) run an app and a worker of their own,
 * which they kill and restart, beside the test run's; `smtpProxy` is a relay in
 * front of the mail catcher that the tests can stall.
 */
export const FAULT_PORTS = { app: 3120 + TEST_SLOT, smtpProxy: 1056 + TEST_SLOT };
