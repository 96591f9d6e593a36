// Validates the environment the way the server will, and exits 78 with a clear message if bad.
import { getEnv } from "../app/env.server";

getEnv();
