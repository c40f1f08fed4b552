// How the registry words a token's state (GLOSSARY: our own state names).
import type { TokenState } from "@/lib/devices/registry";

export const TOKEN_STATE_WORDS: Record<TokenState, string> = {
  none: "No token yet",
  issued: "Issued",
  rotating: "Rotating — old token still valid",
  revoked: "Revoked",
};
