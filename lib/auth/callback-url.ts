// Only same-origin paths may be returned to after sign-in (no open redirect).
export function safeCallbackUrl(raw: string | undefined | null): string {
  if (!raw || !raw.startsWith("/") || raw.startsWith("//") || raw.startsWith("/\\") || raw.startsWith("/signin")) return "/";
  return raw;
}
