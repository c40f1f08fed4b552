// RFC 4180 §2.6–2.7: a field with a comma, a double quote or a line break is enclosed in double quotes, and a double
// quote inside it is written twice. One rule for every CSV Corvane writes (audit export, quality metrics, the device
// import template); pure, so client code may use it too.
const NEEDS_QUOTES = /[",\r\n]/;

export function csvQuote(v: string): string {
  return NEEDS_QUOTES.test(v) ? `"${v.replaceAll('"', '""')}"` : v;
}
