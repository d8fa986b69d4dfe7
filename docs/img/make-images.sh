#!/bin/sh
# Regenerate the figures shown in README.md and docs/figures.md (run from the repository root,
# with orbviz installed). Each line is an ordinary orbviz command.
set -e
cd "$(dirname "$0")"
orbviz render 3dz2 --size 800x600 --title "3dz2, 90%" -o render-3dz2.png
orbviz render 4,2,1 --size 800x600 --title "4d, m = +1" -o render-4d-m1.png
orbviz render 4s --cut half --nodes --size 800x600 --title "4s, cut open" -o render-4s-cut.png
orbviz render 3dxy --view z --axis-lines --size 800x600 --title "3dxy from +z" \
    -o render-3dxy-top.png
orbviz render 3d --width 175mm --dpi 150 -o sheet-3d.png
orbviz plot 3s --kind slice --width 120mm --dpi 200 -o plot-3s-slice.png
orbviz plot 3pz --kind slice --quantity psi --width 120mm --dpi 200 -o plot-3pz-psi.png
orbviz plot 3s 3p 3d --kind radial --width 120mm --dpi 200 -o plot-n3-radial.png
# a page, photographed in headless chromium (software WebGL)
orbviz render 3dz2 -o /tmp/orbviz-page-3dz2.html
python ../../tests/tools/page_screenshot.py /tmp/orbviz-page-3dz2.html page-3dz2.png
# electron clouds (docs/clouds.md)
orbviz render 3dz2 --style cloud --size 800x600 --title "3dz2: 40 000 dots" -o cloud-3dz2.png
orbviz render 3s --style volume --cut half --size 800x600 \
    --title "3s as a glowing density, cut open" -o volume-3s-cut.png
orbviz plot 3dz2 3dxy --kind dots --width 150mm --dpi 150 -o dots-3d.png
