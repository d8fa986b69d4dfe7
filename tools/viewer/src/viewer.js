// The orbviz page viewer: three.js scenes of the GLB surfaces inlined in the page.
// Built into orbviz/pages/viewer.js by tools/viewer/build.sh (esbuild, one offline script).
// The page holds its data in <script type="application/json" id="orbviz-data">; see
// orbviz/pages/build.py for the fields. Nothing here loads anything from the network.
import * as THREE from "three";
import { OrbitControls } from "three/examples/jsm/controls/OrbitControls.js";
import { GLTFLoader } from "three/examples/jsm/loaders/GLTFLoader.js";

const data = JSON.parse(document.getElementById("orbviz-data").textContent);
const root = document.getElementById("orbviz");
const Z_UP = new THREE.Quaternion().setFromAxisAngle(new THREE.Vector3(1, 0, 0), -Math.PI / 2);
// x > 0 cut away (half) or x > 0 and y > 0 (quarter): the physics frame's x is the world's x,
// its y the world's -z
// its y the world's -z. The planes sit a hair beyond zero, so that a nodal plane lying in a cut
// plane is kept whole rather than speckled by rounding.
const CUTS = {};
const VIEWS = { iso: [35, 25], x: [0, 0], y: [90, 0], z: [0, 90] };

const start = data.start || {};
const state = {
  level: data.level,
  nodes: !!start.nodes,
  cut: start.cut || "none",
  axes: !!start.axes,
  dots: false,
  active: 0,
};
const CUT_ORDER = ["none", "half", "quarter"];
const reach = Math.max(...data.panels.map((p) => p.reach));
const camera = new THREE.OrthographicCamera(-1, 1, 1, -1, reach * 0.01, reach * 40);
const target = new THREE.Vector3();
const views = [];
const hair = reach * 1e-3;
CUTS.half = [new THREE.Plane(new THREE.Vector3(-1, 0, 0), hair)];
CUTS.quarter = [...CUTS.half, new THREE.Plane(new THREE.Vector3(0, 0, 1), hair)];

function direction(az, el) {
  // azimuth from +x towards +y, elevation above xy, in the physics frame -> world (y up)
  const a = THREE.MathUtils.degToRad(az);
  const e = THREE.MathUtils.degToRad(Math.min(89.9, Math.max(-89.9, el)));
  const p = new THREE.Vector3(Math.cos(e) * Math.cos(a), Math.cos(e) * Math.sin(a), Math.sin(e));
  return p.applyQuaternion(Z_UP);
}

function setView(name) {
  const [az, el] = VIEWS[name] || data.view;
  camera.position.copy(direction(az, el).multiplyScalar(reach * 10));
  camera.up.set(0, 1, 0);
  camera.zoom = 1;
  target.set(0, 0, 0);
  camera.lookAt(target);
  camera.updateProjectionMatrix();
  views.forEach((v) => v.controls.target.copy(target));
  views.forEach((v) => v.controls.update());
  renderAll();
}

function material(source, cut, opacity) {
  const m = new THREE.MeshStandardMaterial({
    color: source.color,
    vertexColors: source.vertexColors,
    roughness: 0.6,
    metalness: 0,
    side: cut === "none" ? THREE.FrontSide : THREE.DoubleSide,
    clippingPlanes: CUTS[cut] || [],
    clipIntersection: true, // cut away only where outside every plane (the quarter)
    transparent: opacity < 1,
    opacity,
    depthWrite: opacity >= 1,
  });
  return m;
}

function decode(base64) {
  const text = atob(base64);
  const bytes = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
  return bytes.buffer;
}

function nodeMeshes(nodes) {
  const group = new THREE.Group();
  const look = new THREE.MeshStandardMaterial({
    color: 0x777777, transparent: true, opacity: 0.28, side: THREE.DoubleSide, depthWrite: false,
  });
  const r = reach * 1.05;
  nodes.spheres.forEach((r0) => group.add(new THREE.Mesh(new THREE.SphereGeometry(r0, 64, 32), look)));
  nodes.planes.forEach((n) => {
    const disc = new THREE.Mesh(new THREE.CircleGeometry(r, 96), look);
    disc.lookAt(new THREE.Vector3(...n)); // the disc's normal (+z) turned to the plane's
    group.add(disc);
  });
  nodes.cones.forEach((theta) => {
    const up = theta < Math.PI / 2;
    const half = up ? theta : Math.PI - theta;
    const h = r * Math.cos(half);
    const g = new THREE.ConeGeometry(r * Math.sin(half), h, 96, 1, true);
    g.translate(0, -h / 2, 0); // apex at the nucleus, opening along -y
    g.rotateX(up ? -Math.PI / 2 : Math.PI / 2); // ... along +z (or -z) of the physics frame
    group.add(new THREE.Mesh(g, look));
  });
  group.quaternion.copy(Z_UP);
  return group;
}

function letter(text) {
  // a letter as a sprite: drawn once on a canvas, always facing the camera
  const canvas = document.createElement("canvas");
  canvas.width = canvas.height = 64;
  const g = canvas.getContext("2d");
  g.fillStyle = "#141414";
  g.font = "bold 48px system-ui, sans-serif";
  g.textAlign = "center";
  g.textBaseline = "middle";
  g.fillText(text, 32, 34);
  const sprite = new THREE.Sprite(
    new THREE.SpriteMaterial({ map: new THREE.CanvasTexture(canvas), depthTest: false }),
  );
  sprite.scale.setScalar(reach * 0.14);
  return sprite;
}

function axisLines(length) {
  // x, y and z through the nucleus, in the physics frame, each labelled at its + end
  const group = new THREE.Group();
  const ink = new THREE.LineBasicMaterial({ color: 0x141414 });
  ["x", "y", "z"].forEach((name, k) => {
    const end = new THREE.Vector3().setComponent(k, length);
    const geometry = new THREE.BufferGeometry().setFromPoints([end.clone().negate(), end]);
    group.add(new THREE.Line(geometry, ink));
    const tip = letter(name);
    tip.position.copy(end.clone().multiplyScalar(1.08));
    group.add(tip);
  });
  group.quaternion.copy(Z_UP);
  return group;
}

function dotCloud(cloud) {
  // exact samples of |psi|^2: float32 positions and linear RGB bytes, in the physics frame
  if (!cloud) return null;
  const positions = new Float32Array(decode(cloud.positions));
  const colours = new Uint8Array(decode(cloud.colors));
  const geometry = new THREE.BufferGeometry();
  geometry.setAttribute("position", new THREE.BufferAttribute(positions, 3));
  geometry.setAttribute("color", new THREE.BufferAttribute(colours, 3, true));
  const material = new THREE.PointsMaterial({ size: 2.5, sizeAttenuation: false, vertexColors: true });
  const points = new THREE.Points(geometry, material);
  points.quaternion.copy(Z_UP);
  return points;
}

async function makeScene(panel) {
  const scene = new THREE.Scene();
  scene.add(new THREE.HemisphereLight(0xffffff, 0x444444, 1.6));
  const key = new THREE.DirectionalLight(0xffffff, 1.8); // follows the camera: above left
  scene.add(key);
  const loader = new GLTFLoader();
  const levels = [];
  for (const level of panel.levels) {
    const gltf = await loader.parseAsync(decode(level.glb), "");
    const sources = [];
    gltf.scene.traverse((o) => {
      if (o.isMesh) {
        o.geometry.computeVertexNormals(); // the GLB colours are linear light, as glTF says
        sources.push({ mesh: o, base: o.material });
      }
    });
    scene.add(gltf.scene);
    levels.push({ root: gltf.scene, sources });
  }
  const nodes = nodeMeshes(panel.nodes);
  scene.add(nodes);
  const axes = axisLines(reach * 1.15);
  scene.add(axes);
  const dots = dotCloud(panel.cloud);
  if (dots) scene.add(dots);
  return { scene, levels, nodes, key, axes, dots };
}

function applyState(view) {
  const dots = view.parts.dots && state.dots;
  if (view.parts.dots) {
    view.parts.dots.visible = dots;
    view.parts.dots.material.clippingPlanes = CUTS[state.cut] || [];
    view.parts.dots.material.clipIntersection = true;
  }
  view.parts.levels.forEach((level, k) => {
    level.root.visible = k === state.level && !dots; // the dots replace the surface
    level.sources.forEach((s) => {
      s.made = s.made || {};
      s.made[state.cut] = s.made[state.cut] || material(s.base, state.cut, 1);
      s.mesh.material = s.made[state.cut];
    });
  });
  view.parts.nodes.visible = state.nodes;
  view.parts.axes.visible = state.axes;
  view.parts.nodes.children.forEach((m) => {
    m.material.clippingPlanes = CUTS[state.cut] || [];
    m.material.clipIntersection = true;
  });
}

function resize(view) {
  const { width, height } = view.canvas.getBoundingClientRect();
  if (!width || !height) return;
  view.renderer.setSize(width, height, false);
  view.aspect = width / height;
}

function framed() {
  // a grid shares one camera and one scale; a chooser frames the orbital shown
  return data.arrangement === "grid" ? reach : data.panels[state.active].reach;
}

function renderView(view) {
  if (!view.visible) return;
  const half = framed() * 1.15;
  const aspect = view.aspect || 1;
  camera.left = -half * Math.max(aspect, 1);
  camera.right = half * Math.max(aspect, 1);
  camera.top = half / Math.min(aspect, 1);
  camera.bottom = -half / Math.min(aspect, 1);
  camera.updateProjectionMatrix();
  camera.updateMatrixWorld();
  view.parts.key.position.copy(new THREE.Vector3(-0.6, 0.7, 1).multiplyScalar(reach * 10).applyMatrix4(camera.matrixWorld));
  view.renderer.render(view.parts.scene, camera);
  scaleBar(view);
}

function renderAll() {
  views.forEach(renderView);
  root.dataset.frames = String(Number(root.dataset.frames || 0) + 1);
}

function scaleBar(view) {
  const px = view.canvas.clientWidth;
  if (!px) return;
  const perUnit = (px / (camera.right - camera.left)) * camera.zoom;
  const want = (px * 0.22) / perUnit;
  const step = 10 ** Math.floor(Math.log10(want));
  const nice = [5, 2, 1].map((k) => k * step).find((v) => v <= want) || step;
  view.bar.style.width = `${Math.round(nice * perUnit)}px`;
  view.barText.textContent = `${+nice.toPrecision(3)} ${data.unit_label}`;
}

function rotate(dAz, dEl) {
  const offset = camera.position.clone().sub(target);
  const s = new THREE.Spherical().setFromVector3(offset);
  s.theta += THREE.MathUtils.degToRad(dAz);
  s.phi = Math.min(Math.PI - 0.01, Math.max(0.01, s.phi - THREE.MathUtils.degToRad(dEl)));
  camera.position.copy(new THREE.Vector3().setFromSpherical(s).add(target));
  camera.lookAt(target);
  renderAll();
}

function zoom(factor) {
  camera.zoom = Math.min(20, Math.max(0.2, camera.zoom * factor));
  camera.updateProjectionMatrix();
  renderAll();
}

function setLevel(k) {
  state.level = Math.max(0, Math.min(data.levels.length - 1, k));
  document.querySelectorAll("input[name=level]").forEach((el) => {
    el.checked = Number(el.value) === state.level;
  });
  views.forEach(applyState);
  views.forEach((v) => {
    const level = data.panels[v.index].levels[state.level];
    v.numbers.textContent = level.numbers;
    v.alt.textContent = level.alt;
    v.canvas.setAttribute("aria-label", level.alt);
  });
  root.dataset.level = String(state.level);
  renderAll();
}

function toggle(what, value) {
  if (what === "nodes") state.nodes = value;
  if (what === "axes") state.axes = value;
  if (what === "dots") state.dots = value;
  if (what === "cut") state.cut = value;
  views.forEach(applyState);
  renderAll();
}

function choose(k) {
  state.active = k;
  views.forEach((v) => {
    v.visible = data.arrangement === "grid" || v.index === k;
    v.cell.hidden = !v.visible;
  });
  views.forEach(resize);
  renderAll();
}

function keyboard(event) {
  if (event.target instanceof HTMLInputElement && event.target.type === "text") return;
  const keys = {
    ArrowLeft: () => rotate(-10, 0),
    ArrowRight: () => rotate(10, 0),
    ArrowUp: () => rotate(0, 10),
    ArrowDown: () => rotate(0, -10),
    "+": () => zoom(1.2),
    "=": () => zoom(1.2),
    "-": () => zoom(1 / 1.2),
    r: () => setView(null),
    x: () => setView("x"),
    y: () => setView("y"),
    z: () => setView("z"),
    i: () => setView("iso"),
    n: () => {
      document.getElementById("nodes").checked = !state.nodes;
      toggle("nodes", !state.nodes);
    },
    d: () => {
      document.getElementById("dots").checked = !state.dots;
      toggle("dots", !state.dots);
    },
    a: () => {
      document.getElementById("axes").checked = !state.axes;
      toggle("axes", !state.axes);
    },
    c: () => {
      const next = CUT_ORDER[(CUT_ORDER.indexOf(state.cut) + 1) % CUT_ORDER.length];
      document.getElementById("cut").value = next;
      toggle("cut", next);
    },
  };
  const digit = Number(event.key);
  if (Number.isInteger(digit) && digit >= 1 && digit <= data.levels.length) {
    setLevel(digit - 1);
  } else if (keys[event.key]) {
    keys[event.key]();
  } else {
    return;
  }
  event.preventDefault();
}

async function main() {
  try {
    for (const [index, panel] of data.panels.entries()) {
      const cell = document.getElementById(`panel-${index}`);
      const canvas = cell.querySelector("canvas");
      const renderer = new THREE.WebGLRenderer({ canvas, antialias: true, preserveDrawingBuffer: true });
      renderer.setPixelRatio(Math.min(window.devicePixelRatio || 1, 2));
      renderer.localClippingEnabled = true;
      renderer.setClearColor(new THREE.Color(start.background || "#FFFFFF"), 1);
      const view = {
        index, cell, canvas, renderer, visible: true,
        parts: await makeScene(panel),
        bar: cell.querySelector(".bar"),
        barText: cell.querySelector(".bar-text"),
        numbers: cell.querySelector(".numbers"),
        alt: cell.querySelector(".alt"),
      };
      view.controls = new OrbitControls(camera, canvas);
      view.controls.enableDamping = false;
      view.controls.addEventListener("change", renderAll);
      views.push(view);
      applyState(view);
    }
    document.querySelectorAll("input[name=level]").forEach((el) =>
      el.addEventListener("change", () => setLevel(Number(el.value))));
    document.getElementById("nodes").addEventListener("change", (e) => toggle("nodes", e.target.checked));
    document.getElementById("axes").addEventListener("change", (e) => toggle("axes", e.target.checked));
    document.getElementById("dots").addEventListener("change", (e) => toggle("dots", e.target.checked));
    document.getElementById("cut").addEventListener("change", (e) => toggle("cut", e.target.value));
    document.querySelectorAll("button[data-view]").forEach((b) =>
      b.addEventListener("click", () => setView(b.dataset.view === "reset" ? null : b.dataset.view)));
    const chooser = document.getElementById("chooser");
    if (chooser) chooser.addEventListener("change", () => choose(Number(chooser.value)));
    window.addEventListener("keydown", keyboard);
    window.addEventListener("resize", () => {
      views.forEach(resize);
      renderAll();
    });
    choose(0);
    setView(null);
    setLevel(state.level);
    root.dataset.ready = "yes";
  } catch (error) {
    root.dataset.ready = "failed";
    document.getElementById("status").textContent = `This page could not draw its models: ${error}`;
    throw error;
  }
}

main();
