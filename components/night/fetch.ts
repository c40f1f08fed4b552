// The Night review's SWR fetcher: JSON from the review route handlers, with their error message on failure.
export async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { message?: string } | null;
    throw new Error(body?.message ?? `request failed (${res.status})`);
  }
  return (await res.json()) as T;
}
