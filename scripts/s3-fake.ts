// Runs only the S3 fake of scripts/fakes.ts (npm test starts it before seeding the demo photos):
// 127.0.0.1:PHOTOS_S3_PORT (default 4569), objects in PHOTOS_S3_DIR (default .data/s3).
import { startS3Fake } from "./fakes";

try {
  const fake = await startS3Fake({ port: Number(process.env.PHOTOS_S3_PORT ?? 4569), directory: process.env.PHOTOS_S3_DIR ?? ".data/s3" });
  console.log(`[fakes] s3 listening on 127.0.0.1:${fake.port}`);
  const stop = () => void fake.close().then(() => process.exit(0));
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
} catch (error) {
  console.error(`[fakes] the S3 fake could not start: ${(error as Error).message}`);
  process.exit(1);
}
