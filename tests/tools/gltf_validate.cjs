// Validate a .glb or .gltf with the Khronos glTF validator (npm package gltf-validator).
// Usage: node gltf_validate.cjs FILE   -> prints the validator's JSON report on stdout.
// The package is looked up through NODE_PATH (set by the tests to where .ci/run installed it).
const fs = require("fs");
const path = require("path");
const validator = require("gltf-validator");

const file = process.argv[2];
const data = new Uint8Array(fs.readFileSync(file));
validator
  .validateBytes(data, {
    uri: path.basename(file),
    maxIssues: 100,
    externalResourceFunction: (uri) =>
      new Promise((resolve, reject) => {
        fs.readFile(path.join(path.dirname(file), decodeURIComponent(uri)), (err, bytes) =>
          err ? reject(err.toString()) : resolve(new Uint8Array(bytes)));
      }),
  })
  .then((report) => console.log(JSON.stringify(report)))
  .catch((error) => { console.error(String(error)); process.exit(2); });
