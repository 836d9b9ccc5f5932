import { coreHours } from "@/lib/format";

const fine = new Intl.NumberFormat("en-GB", { maximumSignificantDigits: 2 });

/**
 * Core-hours as lib/format's coreHours writes them, but a small amount keeps two significant
 * digits: a one-minute run's 0.017 core-hours must not read as "0".
 */
export const coreHoursFine = (x: number) => (x !== 0 && Math.abs(x) < 1 ? fine.format(x) : coreHours(x));
