// Fixed loopback ports, non-default so Dipwell never collides with a system
// PostgreSQL or another project's fakes. The test run has its own set, so
// `npm test` can run while `npm start` is serving.
export type Ports = { postgres: number; s3: number; smtp: number; mailWeb: number; app: number };

export const DEV_PORTS: Ports = { postgres: 54329, s3: 4569, smtp: 1026, mailWeb: 1081, app: 3000 };
export const TEST_PORTS: Ports = { postgres: 54339, s3: 4579, smtp: 1036, mailWeb: 1091, app: 3100 };
