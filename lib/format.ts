// Numbers as physicists write them. Pure functions shared by pages, exports and tests.

/**
 * Concise (parenthesis) notation: value 1.22234, error 0.00141 → "1.2223(14)".
 * The error is shown with two significant digits; the value is rounded to the same decimal place.
 */
export function concise(value: number, error: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (!Number.isFinite(error) || error <= 0) return formatPlain(value);
  let exp = Math.floor(Math.log10(error)) - 1; // place of the error's second significant digit
  if (Math.round(error / 10 ** exp) >= 100) exp += 1; // 0.000996 rounds to 0.0010: keep two digits
  const minus = (s: string) => s.replace("-", "−");
  if (exp < 0) {
    const dec = -exp;
    return `${minus(value.toFixed(dec))}(${Math.round(error * 10 ** dec)})`;
  }
  // errors of 10 and more: value and error rounded to the same (integer) place
  const scale = 10 ** exp;
  return `${minus(String(Math.round(value / scale) * scale))}(${Math.round(error / scale) * scale})`;
}

export function formatPlain(x: number, digits = 6): string {
  return Number(x.toPrecision(digits)).toString().replace("-", "−");
}

const coreHourFmt = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1, minimumFractionDigits: 0 });
/** Core-hours with thousands separators, e.g. "12,500". */
export const coreHours = (x: number) => coreHourFmt.format(x);

/** An ISO UTC string for title attributes. */
export const utc = (d: Date | string) => new Date(d).toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC");
