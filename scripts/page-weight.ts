// Measures the gzip size of the JavaScript a page loads from the built app (build/client),
// following the page's modulepreload links and script tags. Usage: page-weight.ts URL [URL…]
// (pageWeight also takes request headers, e.g. a session cookie for signed-in pages).
import { readFileSync } from "node:fs";
import { gzipSync } from "node:zlib";

export async function pageWeight(url: string, headers: Record<string, string> = {}) {
  const html = await (await fetch(url, { headers })).text();
  const srcs = new Set<string>();
  for (const m of html.matchAll(/<link rel="modulepreload" href="([^"]+)"/g)) srcs.add(m[1]!);
  for (const m of html.matchAll(/<script[^>]+src="([^"]+)"/g)) srcs.add(m[1]!);
  for (const m of html.matchAll(/import\("([^"]+\.js)"\)/g)) srcs.add(m[1]!);
  let raw = 0;
  let gzip = 0;
  const files: Array<{ file: string; gzipKB: number }> = [];
  for (const src of srcs) {
    const body = readFileSync(new URL(`../build/client${new URL(src, url).pathname}`, import.meta.url));
    const z = gzipSync(body, { level: 9 }).length;
    raw += body.length;
    gzip += z;
    files.push({ file: src, gzipKB: +(z / 1024).toFixed(1) });
  }
  return { url, files, rawKB: +(raw / 1024).toFixed(1), gzipKB: +(gzip / 1024).toFixed(1) };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const url of process.argv.slice(2)) {
    const w = await pageWeight(url);
    console.log(`${w.url}: ${w.gzipKB} KB gzip (${w.rawKB} KB raw) in ${w.files.length} files`);
  }
}
