// Numbers as physicists write them. Pure functions shared by pages, exports and tests.

/**
 * Concise (parenthesis) notation: value 1.22234, error 0.00141 → "1.2223(14)".
 * The error is shown with two significant digits; the value is rounded to the same decimal place.
 */
export function concise(value: number, error: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (!Number.isFinite(error) || error <= 0) return formatPlain(value);
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(error)));
  let errDigits = Math.round(error * 10 ** decimals);
  let dec = decimals;
  if (errDigits >= 100 && dec > 0) { dec -= 1; errDigits = Math.round(error * 10 ** dec); }
  const v = value.toFixed(dec).replace("-", "−");
  if (dec === 0) return `${v}(${Math.round(error)})`;
  return `${v}(${errDigits})`;
}

export function formatPlain(x: number, digits = 6): string {
  return Number(x.toPrecision(digits)).toString().replace("-", "−");
}

const coreHourFmt = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1, minimumFractionDigits: 0 });
/** Core-hours with thousands separators, e.g. "12,500". */
export const coreHours = (x: number) => coreHourFmt.format(x);

/** An ISO UTC string for title attributes. */
export const utc = (d: Date | string) => new Date(d).toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC");
