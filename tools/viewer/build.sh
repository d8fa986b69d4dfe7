#!/usr/bin/env bash
# Rebuild orbviz/pages/viewer.js: three.js (MIT) and src/viewer.js in one minified script that
# pages inline, so a page works offline from file://. Versions are pinned in package.json.
set -euo pipefail
cd "$(dirname "$0")"
npm install --no-audit --no-fund --silent
out=../../orbviz/pages
npx esbuild src/viewer.js --bundle --minify --format=iife --target=es2020 \
  --legal-comments=none --outfile="$out/viewer.js"
cp node_modules/three/LICENSE "$out/THREE-LICENSE.txt"
node -e 'const p=require("./node_modules/three/package.json");console.log(`three ${p.version} (${p.license})`)' > "$out/VIEWER-VERSION.txt"
ls -l "$out/viewer.js"
