// Renders public/icons/icon.svg into the PNG sizes the manifest and browsers ask for, and
// public/favicon.ico (a PNG inside an ICO container). Run after changing the SVG: npx tsx scripts/icons.ts
import { readFileSync, writeFileSync } from "node:fs";
import { Resvg } from "@resvg/resvg-js";

const svg = readFileSync("public/icons/icon.svg", "utf8");
const render = (size: number, source = svg) =>
  new Resvg(source, { fitTo: { mode: "width", value: size } }).render().asPng();

for (const size of [48, 72, 96, 144, 180, 192, 256, 384, 512]) {
  writeFileSync(`public/icons/icon-${size}.png`, render(size));
}
// Maskable: the artwork inside the 80 % safe zone on a full-bleed background.
const maskable = svg
  .replace('<rect width="512" height="512" rx="112" fill="url(#sky)"/>', '<rect width="512" height="512" fill="url(#sky)"/><g transform="translate(51.2 51.2) scale(0.8)">')
  .replace("</svg>", "</g></svg>");
writeFileSync("public/icons/maskable-512.png", render(512, maskable));
writeFileSync("public/icons/maskable-192.png", render(192, maskable));

const png = render(32);
const header = Buffer.alloc(22);
header.writeUInt16LE(0, 0); // reserved
header.writeUInt16LE(1, 2); // icon
header.writeUInt16LE(1, 4); // one image
header.writeUInt8(32, 6); // width
header.writeUInt8(32, 7); // height
header.writeUInt16LE(1, 10); // planes
header.writeUInt16LE(32, 12); // bits per pixel
header.writeUInt32LE(png.length, 14);
header.writeUInt32LE(22, 18); // offset
writeFileSync("public/favicon.ico", Buffer.concat([header, png]));
console.log("icons written");
