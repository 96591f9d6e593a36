// Photo processing speed: type check, re-encode without metadata and thumbnail, as the upload
// route does it, for phone-sized pictures of noise (the worst case: nothing compresses away). Prints
// median and p95 of 10 runs after 2 warm-ups. `npx tsx scripts/bench-photos.ts`
import sharp from "sharp";
import { processPhoto } from "../app/photos/process.server";

const image = () => sharp({ create: { width: 4000, height: 3000, channels: 3, background: "#456", noise: { type: "gaussian", mean: 120, sigma: 40 } } });
const sources = {
  "12 MP JPEG": new Uint8Array(await image().jpeg({ quality: 88 }).toBuffer()),
  "12 MP WebP": new Uint8Array(await image().webp({ quality: 85 }).toBuffer()),
  // A PNG of noise is far larger than 15 MB; a 4 MP one stays under the limit.
  "4 MP PNG": new Uint8Array(await image().resize(2300, 1725).png().toBuffer()),
};
for (const [name, source] of Object.entries(sources)) {
  const times: number[] = [];
  for (let i = 0; i < 12; i++) {
    const t = performance.now();
    await processPhoto(source, { keepLocation: false });
    if (i >= 2) times.push(performance.now() - t);
  }
  times.sort((a, b) => a - b);
  const at = (q: number) => times[Math.min(times.length - 1, Math.floor(q * times.length))]!;
  console.log(`${name} (${(source.byteLength / 1024 / 1024).toFixed(1)} MB): median ${at(0.5).toFixed(0)} ms, p95 ${at(0.95).toFixed(0)} ms over ${times.length} runs`);
}
