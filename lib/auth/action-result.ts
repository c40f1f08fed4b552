// What every server action returns: expected failures are values shown near the field, not exceptions.
export type ActionErrorCode = "unauthorized" | "forbidden" | "invalid_input" | "conflict" | "not_found" | "server_error";

export type ActionResult<R = undefined> =
  | { ok: true; message: string; data?: R }
  | { ok: false; code: ActionErrorCode; message: string; fieldErrors?: Record<string, string[]> };
