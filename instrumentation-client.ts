// Runs in the browser before any of the app's own code. zod compiles object schemas with
// `new Function` when it may; under our content security policy (no 'unsafe-eval') its probe for
// that is reported as a policy violation, so it is told up front not to try.
import { config } from "zod/v4/core";

config({ jitless: true });
