// Measures the gzip size of the JavaScript a page loads from the built app (build/client),
// following the page's modulepreload links and script tags. Usage: page-weight.ts URL [URL…]
// (pageWeight also takes request headers, e.g. a session cookie for signed-in pages).
import { readFileSync } from "node:fs";
import { gzipSync } from "node:zlib";
import { fileURLToPath } from "node:url";

/** `clientDir`: the built app's client folder (default build/client; the bare anchor app has its own). */
export async function pageWeight(url: string, headers: Record<string, string> = {}, clientDir = fileURLToPath(new URL("../build/client", import.meta.url))) {
  const html = await (await fetch(url, { headers })).text();
  const srcs = new Set<string>();
  for (const m of html.matchAll(/<link rel="modulepreload" href="([^"]+)"/g)) srcs.add(m[1]!);
  for (const m of html.matchAll(/<script[^>]+src="([^"]+)"/g)) srcs.add(m[1]!);
  for (const m of html.matchAll(/import\("([^"]+\.js)"\)/g)) srcs.add(m[1]!);
  let raw = 0;
  let gzip = 0;
  const files: Array<{ file: string; gzipKB: number }> = [];
  for (const src of srcs) {
    const body = readFileSync(`${clientDir}${new URL(src, url).pathname}`);
    const z = gzipSync(body, { level: 9 }).length;
    raw += body.length;
    gzip += z;
    files.push({ file: src, gzipKB: +(z / 1024).toFixed(1) });
  }
  return { url, files, rawKB: +(raw / 1024).toFixed(1), gzipKB: +(gzip / 1024).toFixed(1) };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const args = process.argv.slice(2);
  // `--against BARE_URL BARE_CLIENT_DIR`: also print the anchor's weight and the ratio.
  const at = args.indexOf("--against");
  const urls = at >= 0 ? args.slice(0, at) : args;
  for (const url of urls) {
    const w = await pageWeight(url);
    console.log(`${w.url}: ${w.gzipKB} KB gzip (${w.rawKB} KB raw) in ${w.files.length} files`);
    if (at >= 0) {
      const b = await pageWeight(args[at + 1]!, {}, args[at + 2]!);
      console.log(`  bare React Router app, same loader: ${b.gzipKB} KB gzip; ratio ${(w.gzipKB / b.gzipKB).toFixed(2)}x (goal <= 1.15x)`);
    }
  }
}
