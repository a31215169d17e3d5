import { createContext } from "react-router";
import type { SessionUser } from "./auth.server";

/** The signed-in user, put into the router context by the root middleware (or null). */
export const userContext = createContext<SessionUser | null>(null);

/**
 * The client's network address as the web server saw it (app/ops/server.mjs: the
 * socket's peer, or the trusted proxy's X-Forwarded-For), or null when unknown.
 */
export const clientAddressContext = createContext<string | null>(null);
