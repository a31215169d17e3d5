import { createContext } from "react-router";
import type { SessionUser } from "./auth.server";

/** The signed-in user, put into the router context by the root middleware (or null). */
export const userContext = createContext<SessionUser | null>(null);
