// The anchor app for `npm run bench`: a bare React Router app with Tilldawn's home loader and
// nothing else (no styles, fonts, worker or shell). Built on this machine in the same run.
import type { Config } from "@react-router/dev/config";

export default { ssr: true, appDirectory: "app", buildDirectory: "../../.data/bench/bare-build" } satisfies Config;
