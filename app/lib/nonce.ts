// The per-response nonce that lets the framework's own inline scripts run under
// the Content-Security-Policy. The server puts it in this React context
// (app/entry.server.tsx); in the browser it is empty, as the page already ran.
import { createContext, useContext } from "react";

export const NonceContext = createContext<string | undefined>(undefined);
export const useNonce = () => useContext(NonceContext);
