// Waits until a URL answers (any HTTP status) or the timeout passes. Usage: wait-ready URL [ms]
const [url, ms = "20000"] = process.argv.slice(2);
const deadline = Date.now() + Number(ms);
while (Date.now() < deadline) {
  try {
    await fetch(url);
    process.exit(0);
  } catch {
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}
console.error(`[tilldawn] ${url} did not answer within ${ms} ms`);
process.exit(1);
