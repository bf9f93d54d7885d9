// Builds dist/viewer.bundle.js: three.js and src/ bundled by esbuild into one minified IIFE.
// Its first line holds the sha256 of the sources (see sourcesDigest), which
// tests/test_export_viewer.py recomputes to catch a bundle that is stale.
import { createHash } from "node:crypto";
import { copyFileSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from "node:fs";
import { dirname, join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";
import { build } from "esbuild";

const here = dirname(fileURLToPath(import.meta.url));

function listFiles(dir) {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? listFiles(join(dir, e.name)) : [join(dir, e.name)]);
}

// The files the bundle is made from: build.mjs, package.json, package-lock.json and src/**,
// by relative POSIX path in code-point order; each contributes its path, a NUL, its bytes and a NUL.
export function sourcesDigest() {
  const files = ["build.mjs", "package.json", "package-lock.json", ...listFiles(join(here, "src")).map(
    (f) => relative(here, f).split(sep).join("/"))].sort();
  const hash = createHash("sha256");
  for (const rel of files) {
    hash.update(rel + "\0");
    hash.update(readFileSync(join(here, rel)));
    hash.update("\0");
  }
  return hash.digest("hex");
}

const result = await build({
  entryPoints: [join(here, "src", "main.js")],
  bundle: true,
  minify: true,
  format: "iife",
  target: "es2020",
  loader: { ".css": "text" },
  legalComments: "eof",
  write: false,
  logLevel: "warning",
});
const header = `/* swingsim viewer bundle; sources-sha256: ${sourcesDigest()} */\n`;
mkdirSync(join(here, "dist"), { recursive: true });
writeFileSync(join(here, "dist", "viewer.bundle.js"), header + result.outputFiles[0].text);
copyFileSync(join(here, "node_modules", "three", "LICENSE"), join(here, "LICENSE-three.txt"));
console.log(`dist/viewer.bundle.js: ${(header.length + result.outputFiles[0].text.length) / 1024 | 0} KiB`);
