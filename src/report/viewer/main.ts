/**
 * The report's 3D viewer (browser code, bundled with three.js by esbuild and inlined into
 * report.html; see ../viewerScript.ts). Reads the `report-data` JSON block, draws the wire as a
 * tube coloured by curvature, torsion or model state, and marks `body[data-rendered="1"]` after the
 * first frame (or "error" with a visible message when WebGL is missing). No network access.
 */
import * as THREE from "three";
import { OrbitControls } from "three/examples/jsm/controls/OrbitControls.js";
import { curvatureColor, stateColor, torsionColor, type Rgb } from "../colorScales.js";
import { niceLength } from "../niceLength.js";
import { setUpSaveButtons } from "./savePlots.js";
import { symEigen3 } from "../../frame/symEigen3.js";
import { browser, type ViewerCanvas, type ViewerElement } from "./dom.js";

interface ViewData {
  unit: string;
  closed: boolean;
  radius: number;
  points: string;
  kappa: string;
  tau: string;
  state: string;
  kappaMin: number;
  kappaMax: number;
  tauMaxAbs: number;
  /** Stretch boundaries and pinning sites (float32 x, y, z, base64), pinning ranks alongside. */
  cuts: string;
  pins: string;
  pinRanks: number[];
  /** The input points (float32 x, y, z, base64), shown on demand. */
  input: string;
}

/** Screen size of the overlay's coordinate system (the canvas' CSS aspect, see reportStyle.ts). */
const OVERLAY_W = 760, OVERLAY_H = 440;


type Mode = "kappa" | "tau" | "state";

const win = browser();
const doc = win.document;

function bytes(b64: string): Uint8Array {
  const s = win.atob(b64);
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; ++i) out[i] = s.charCodeAt(i);
  return out;
}

function floats(b64: string): Float32Array {
  const b = bytes(b64);
  return new Float32Array(b.buffer, b.byteOffset, b.byteLength / 4);
}

/** Unit eigenvectors of a symmetric 3x3 (row-major), ascending eigenvalues (the project's own solver). */
function principalAxes(c: number[]): { values: number[]; vectors: number[][] } {
  const { values, vectors } = symEigen3(c);
  return { values: Array.from(values), vectors: [0, 1, 2].map((k) => [vectors[3 * k], vectors[3 * k + 1], vectors[3 * k + 2]]) };
}

function fail(message: string): void {
  const box = doc.getElementById("view3d-message");
  if (box !== null) {
    box.textContent = message;
    box.hidden = false;
  }
  doc.body.dataset.rendered = "error";
}

function start(): void {
  const dataEl = doc.getElementById("report-data");
  const canvas = doc.getElementById("view3d-canvas") as ViewerCanvas | null;
  if (dataEl === null || canvas === null) return;
  const data = JSON.parse(dataEl.textContent ?? "{}") as ViewData;
  const pos = floats(data.points), kappa = floats(data.kappa), tau = floats(data.tau), state = bytes(data.state);
  const n = kappa.length;
  if (n < 2) {
    fail("too few points to draw");
    return;
  }
  let renderer: THREE.WebGLRenderer;
  try {
    renderer = new THREE.WebGLRenderer({ canvas: canvas as never, antialias: true, preserveDrawingBuffer: true });
  } catch (e) {
    fail(`The 3D view needs WebGL, which this browser does not provide (${e instanceof Error ? e.message : String(e)}). The plots above do not need it.`);
    return;
  }
  renderer.setPixelRatio(Math.min(2, win.devicePixelRatio ?? 1));
  renderer.setSize(canvas.clientWidth || canvas.width, canvas.clientHeight || canvas.height, false);
  renderer.setClearColor(0xf4f4f1, 1);

  // the curve and its cumulative chord length (to colour the tube's rings)
  const pts: THREE.Vector3[] = [];
  const cum = new Float64Array(n);
  for (let i = 0; i < n; ++i) {
    pts.push(new THREE.Vector3(pos[3 * i], pos[3 * i + 1], pos[3 * i + 2]));
    if (i > 0) cum[i] = cum[i - 1] + pts[i].distanceTo(pts[i - 1]);
  }
  const total = cum[n - 1] + (data.closed ? pts[n - 1].distanceTo(pts[0]) : 0);
  // view: look along the direction of least spread, with the longest extent across the canvas
  let cx = 0, cy = 0, cz = 0;
  for (const p of pts) { cx += p.x; cy += p.y; cz += p.z; }
  cx /= n; cy /= n; cz /= n;
  const cov = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  let extent = 0;
  for (const p of pts) {
    const d = [p.x - cx, p.y - cy, p.z - cz];
    for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) cov[3 * r + c] += d[r] * d[c] / n;
    extent = Math.max(extent, Math.hypot(d[0], d[1], d[2]));
  }
  const axes = principalAxes(cov);
  // drawn radius: the tube's, but kept visible (at least 0.6% and at most 4% of the size)
  const radius = Math.min(Math.max(data.radius, 0.006 * extent), 0.04 * extent);
  const curve = new THREE.CatmullRomCurve3(pts, data.closed, "centripetal");
  curve.arcLengthDivisions = Math.max(200, 4 * n);
  const tubular = Math.min(4000, Math.max(64, 2 * n));
  const radial = 12;
  const geometry = new THREE.TubeGeometry(curve, tubular, radius, radial, data.closed);
  const colors = new Float32Array(geometry.getAttribute("position").count * 3);
  geometry.setAttribute("color", new THREE.BufferAttribute(colors, 3));
  const material = new THREE.MeshStandardMaterial({ vertexColors: true, roughness: 0.65, metalness: 0.0 });
  const mesh = new THREE.Mesh(geometry, material);
  const scene = new THREE.Scene();
  scene.add(mesh);

  const valueAt = (u: number, mode: Mode): Rgb => {
    const target = u * total;
    let lo = 0, hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (cum[mid] <= target) lo = mid;
      else hi = mid;
    }
    const i = target - cum[lo] <= cum[hi] - target ? lo : hi;
    if (mode === "kappa") return curvatureColor(kappa[i], data.kappaMin, data.kappaMax);
    if (mode === "tau") return torsionColor(tau[i], data.tauMaxAbs);
    return stateColor(state[i]);
  };
  const paint = (mode: Mode): void => {
    const c = new THREE.Color();
    for (let r = 0; r <= tubular; ++r) {
      const rgb = valueAt(r / tubular, mode);
      c.setRGB(rgb[0], rgb[1], rgb[2], THREE.SRGBColorSpace);
      for (let j = 0; j <= radial; ++j) {
        const o = 3 * (r * (radial + 1) + j);
        colors[o] = c.r; colors[o + 1] = c.g; colors[o + 2] = c.b;
      }
    }
    geometry.getAttribute("color").needsUpdate = true;
  };

  const aspect = (canvas.clientWidth || canvas.width) / (canvas.clientHeight || canvas.height);
  const camera = new THREE.PerspectiveCamera(30, aspect, extent / 1000, extent * 100);
  // look mostly along the direction of least spread, tilted toward the other two so that depth shows;
  // the longest extent runs across the (wide) canvas
  const view = new THREE.Vector3(...axes.vectors[0]).multiplyScalar(1)
    .addScaledVector(new THREE.Vector3(...axes.vectors[1]), -0.6)
    .addScaledVector(new THREE.Vector3(...axes.vectors[2]), 0.25)
    .normalize();
  const up = new THREE.Vector3(...axes.vectors[1]);
  up.addScaledVector(view, -up.dot(view)).normalize();
  // distance that fits the wire's projected extent (across and up the screen) with a 12% margin
  const right = new THREE.Vector3().crossVectors(up, view).normalize();
  let halfW = 0, halfH = 0, depth = 0;
  const d = new THREE.Vector3();
  for (const p of pts) {
    d.set(p.x - cx, p.y - cy, p.z - cz);
    halfW = Math.max(halfW, Math.abs(d.dot(right)));
    halfH = Math.max(halfH, Math.abs(d.dot(up)));
    depth = Math.max(depth, d.dot(view));
  }
  const tanHalf = Math.tan(THREE.MathUtils.degToRad(15));
  const fit = 1.12 * Math.max((halfH + radius) / tanHalf, (halfW + radius) / (tanHalf * aspect)) + depth;
  camera.position.set(cx, cy, cz).addScaledVector(view, fit);
  camera.up.copy(up);
  camera.lookAt(cx, cy, cz);
  scene.add(camera);
  scene.add(new THREE.AmbientLight(0xffffff, 1.1));
  const light = new THREE.DirectionalLight(0xffffff, 1.6);
  light.position.set(1, 1, 2);
  camera.add(light);

  // stretch boundaries (dark grey) and pinning sites (red), as small spheres on the tube
  const dot = new THREE.SphereGeometry(1.7 * radius, 16, 12);
  const addDots = (b64: string, color: number): void => {
    if (b64 === "") return;
    const xyz = floats(b64);
    const mat = new THREE.MeshStandardMaterial({ color, roughness: 0.5 });
    for (let i = 0; i + 2 < xyz.length; i += 3) {
      const m = new THREE.Mesh(dot, mat);
      m.position.set(xyz[i], xyz[i + 1], xyz[i + 2]);
      scene.add(m);
    }
  };
  addDots(data.cuts, 0x3a4049);
  addDots(data.pins, 0xb5302c);
  // the input points, hidden until asked for
  let inputCloud: THREE.Points | null = null;
  if (data.input !== "") {
    const g = new THREE.BufferGeometry();
    g.setAttribute("position", new THREE.BufferAttribute(floats(data.input), 3));
    inputCloud = new THREE.Points(g, new THREE.PointsMaterial({ color: 0xd0541b, size: 3, sizeAttenuation: false }));
    inputCloud.visible = false;
    scene.add(inputCloud);
  }

  const controls = new OrbitControls(camera, canvas as never);
  controls.target.set(cx, cy, cz);
  controls.update();
  controls.saveState();

  // overlay: axes triad (lab x, y, z as seen from the camera) and a scale bar at the depth of the view centre
  const el = (id: string): ViewerElement | null => doc.getElementById(id);
  const triad = ["x", "y", "z"].map((a) => ({ line: el(`view3d-axis-${a}`), text: el(`view3d-label-${a}`) }));
  const bar = el("view3d-scale-bar"), barText = el("view3d-scale-text");
  const inverse = new THREE.Quaternion();
  const e = new THREE.Vector3();
  const overlay = (): void => {
    inverse.copy(camera.quaternion).invert();
    const ox = 46, oy = OVERLAY_H - 46, len = 30;
    triad.forEach((t, i) => {
      e.set(i === 0 ? 1 : 0, i === 1 ? 1 : 0, i === 2 ? 1 : 0).applyQuaternion(inverse);
      t.line?.setAttribute("x2", String(ox + len * e.x));
      t.line?.setAttribute("y2", String(oy - len * e.y));
      t.text?.setAttribute("x", String(ox + 1.35 * len * e.x - 3));
      t.text?.setAttribute("y", String(oy - 1.35 * len * e.y + 4));
    });
    const dist = camera.position.distanceTo(controls.target);
    const visible = (2 * dist * Math.tan(THREE.MathUtils.degToRad(camera.fov / 2))) / camera.zoom;
    const perUnit = OVERLAY_H / visible;
    const length = niceLength(150 / perUnit);
    const x1 = OVERLAY_W - 20, x0 = x1 - length * perUnit;
    bar?.setAttribute("x1", String(x0));
    bar?.setAttribute("x2", String(x1));
    if (barText !== null) {
      barText.setAttribute("x", String((x0 + x1) / 2));
      barText.textContent = `${Number(length.toPrecision(3))} ${data.unit}`;
    }
  };

  let pending = false;
  const render = (): void => {
    pending = false;
    renderer.render(scene, camera);
    overlay();
  };
  const request = (): void => {
    if (!pending) {
      pending = true;
      win.requestAnimationFrame(render);
    }
  };
  controls.addEventListener("change", request);
  canvas.addEventListener("dblclick", () => {
    controls.reset();
    request();
  });
  win.addEventListener("resize", () => {
    renderer.setSize(canvas.clientWidth || canvas.width, canvas.clientHeight || canvas.height, false);
    request();
  });

  const legends = doc.getElementById("view3d-legends");
  const buttons = Array.from(doc.body.querySelectorAll("#view3d .controls button")) as ViewerElement[];
  const setMode = (mode: Mode): void => {
    paint(mode);
    for (const b of buttons) b.setAttribute("aria-pressed", String(b.dataset.mode === mode));
    if (legends !== null) legends.dataset.mode = mode;
    request();
  };
  for (const b of buttons) {
    b.addEventListener("click", () => {
      const m = b.dataset.mode;
      if (m === "kappa" || m === "tau" || m === "state") setMode(m);
    });
  }
  const pointsButton = el("view3d-points");
  if (pointsButton !== null) {
    if (inputCloud === null) pointsButton.hidden = true;
    pointsButton.addEventListener("click", () => {
      if (inputCloud === null) return;
      inputCloud.visible = !inputCloud.visible;
      // the points lie on the centre line, inside the tube: see-through tube while they show
      material.transparent = inputCloud.visible;
      material.opacity = inputCloud.visible ? 0.3 : 1;
      material.depthWrite = !inputCloud.visible;
      material.needsUpdate = true;
      pointsButton.setAttribute("aria-pressed", String(inputCloud.visible));
      request();
    });
  }
  paint("kappa");
  render();
  doc.body.dataset.rendered = "1";
}

try {
  setUpSaveButtons();
} catch {
  // the plots stay readable without their save buttons
}
try {
  start();
} catch (e) {
  fail(`The 3D view could not be drawn: ${e instanceof Error ? e.message : String(e)}`);
}
