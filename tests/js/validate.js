// Validate glTF files with the Khronos glTF-Validator; print one JSON report per file, one per line.
// Usage: node validate.js FILE.glb [FILE.gltf ...]   (a .gltf's .bin is read from beside it)
"use strict";
const fs = require("fs");
const path = require("path");
const validator = require("gltf-validator");

async function check(file) {
  const data = new Uint8Array(fs.readFileSync(file));
  const report = await validator.validateBytes(data, {
    uri: path.basename(file),
    maxIssues: 100,
    externalResourceFunction: (uri) =>
      new Promise((resolve, reject) => {
        fs.readFile(path.join(path.dirname(file), decodeURIComponent(uri)), (err, buf) =>
          err ? reject(err.toString()) : resolve(new Uint8Array(buf)));
      }),
  });
  return { file, issues: report.issues, info: report.info };
}

(async () => {
  for (const file of process.argv.slice(2)) {
    process.stdout.write(JSON.stringify(await check(file)) + "\n");
  }
})().catch((err) => {
  process.stderr.write(String(err) + "\n");
  process.exit(1);
});
