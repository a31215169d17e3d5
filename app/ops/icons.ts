// Renders the home-screen icons (public/icons/*.png) from Dipwell's own SVG with sharp.
// Run after changing public/icons/app-icon.svg: `npx tsx app/ops/icons.ts`.
import { readFileSync } from "node:fs";
import path from "node:path";
import sharp from "sharp";

const dir = path.join(process.cwd(), "public", "icons");
const svg = readFileSync(path.join(dir, "app-icon.svg"));

const sizes: [string, number][] = [
  ["icon-192.png", 192],
  ["icon-512.png", 512],
  ["apple-touch-icon.png", 180],
];

for (const [name, size] of sizes) {
  await sharp(svg, { density: Math.ceil((72 * size) / 512) * 2 })
    .resize(size, size)
    .png({ compressionLevel: 9 })
    .toFile(path.join(dir, name));
  console.log(`${name} ${size}×${size}`);
}
