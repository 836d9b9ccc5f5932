import pino from "pino";
import { env } from "./env";

/** The process-wide structured logger; children carry a request id or job id. */
export const log = pino({ level: env.logLevel, base: { app: "ergodex" }, timestamp: pino.stdTimeFunctions.isoTime });
