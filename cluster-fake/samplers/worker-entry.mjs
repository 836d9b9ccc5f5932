// Plain-JS entry of the sampler worker thread: tsx's loader hooks, registered on the main
// thread, do not reach worker threads, so the worker registers them itself before
// loading the TypeScript worker.
import { register } from "tsx/esm/api";

register();
await import("./worker.ts");
