// The browser side of the HTML viewer, kept as plain JavaScript text. It runs after the three.js
// build and OrbitControls are turned into blob: module URLs from the page itself (no network).

export const VIEWER_SCRIPT = String.raw`
const text = (id) => new TextDecoder().decode(Uint8Array.from(atob(document.getElementById(id).textContent.trim()), (c) => c.charCodeAt(0)));
const bytes = (s) => Uint8Array.from(atob(s), (c) => c.charCodeAt(0)).buffer;
const moduleUrl = (src) => URL.createObjectURL(new Blob([src], { type: 'text/javascript' }));
const coreUrl = moduleUrl(text('src-three-core'));
const threeUrl = moduleUrl(text('src-three').split("'./three.core.js'").join(JSON.stringify(coreUrl)));
const orbitUrl = moduleUrl(text('src-orbit').split("'three'").join(JSON.stringify(threeUrl)));
const THREE = await import(threeUrl);
const { OrbitControls } = await import(orbitUrl);
const data = JSON.parse(text('run-data'));

const view = document.getElementById('view');
const renderer = new THREE.WebGLRenderer({ antialias: true, preserveDrawingBuffer: true });
renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
renderer.setClearColor(0xf6f4ee, 1);
view.appendChild(renderer.domElement);
const scene = new THREE.Scene();
scene.add(new THREE.AmbientLight(0xffffff, 0.75));
const key = new THREE.DirectionalLight(0xffffff, 1.6);
const camera = new THREE.PerspectiveCamera(30, 1, 0.1, 1e5);
camera.add(key);
key.position.set(-0.5, 0.8, 1);
scene.add(camera);

for (const o of data.objects) {
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.BufferAttribute(new Float32Array(bytes(o.position)), 3));
  let obj;
  if (o.kind === 'mesh') {
    g.setAttribute('normal', new THREE.BufferAttribute(new Float32Array(bytes(o.normal)), 3));
    if (o.index) g.setIndex(new THREE.BufferAttribute(new Uint32Array(bytes(o.index)), 1));
    obj = new THREE.Mesh(g, new THREE.MeshLambertMaterial({ color: o.color, side: THREE.DoubleSide, transparent: true, opacity: 0.7, depthWrite: false }));
    obj.renderOrder = 2;
  } else {
    const m = new THREE.LineBasicMaterial({ color: o.color, transparent: o.opacity < 1, opacity: o.opacity });
    obj = o.kind === 'segments' ? new THREE.LineSegments(g, m) : new THREE.Line(g, m);
  }
  obj.name = o.name;
  scene.add(obj);
}

const tr = data.trajectories;
const P = new Float32Array(bytes(tr.position));
const T = new Float32Array(bytes(tr.t));
const S = new Int32Array(bytes(tr.start));
const C = new Uint8Array(bytes(tr.rgb));
const n = S.length - 1;
const lines = [];
const heads = new Float32Array(3 * n);
const headColors = new Float32Array(3 * n);
const lineMat = new THREE.LineBasicMaterial({ vertexColors: true, transparent: true, opacity: n > 300 ? 0.45 : 0.9 });
for (let k = 0; k < n; k++) {
  const a = S[k], b = S[k + 1];
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.BufferAttribute(P.subarray(3 * a, 3 * b), 3));
  const col = new Float32Array(3 * (b - a));
  // Colours are sRGB; vertex colours are linear in three's pipeline.
  const lin = new THREE.Color().setRGB(C[3 * k] / 255, C[3 * k + 1] / 255, C[3 * k + 2] / 255, THREE.SRGBColorSpace);
  for (let i = 0; i < b - a; i++) { col[3 * i] = lin.r; col[3 * i + 1] = lin.g; col[3 * i + 2] = lin.b; }
  headColors.set(col.subarray(0, 3), 3 * k);
  g.setAttribute('color', new THREE.BufferAttribute(col, 3));
  const line = new THREE.Line(g, lineMat);
  line.renderOrder = 1;
  lines.push(line);
  scene.add(line);
}
const headGeo = new THREE.BufferGeometry();
headGeo.setAttribute('position', new THREE.BufferAttribute(heads, 3));
headGeo.setAttribute('color', new THREE.BufferAttribute(headColors, 3));
const headPts = new THREE.Points(headGeo, new THREE.PointsMaterial({ size: 5, sizeAttenuation: false, vertexColors: true }));
headPts.renderOrder = 3;
scene.add(headPts);

const tMax = tr.tMax;
const slider = document.getElementById('time');
const label = document.getElementById('time-label');
function showTime(f) {
  const t = f * tMax;
  for (let k = 0; k < n; k++) {
    const a = S[k], b = S[k + 1];
    let lo = a, hi = b;
    while (lo < hi) { const m = (lo + hi) >> 1; if (T[m] <= t) lo = m + 1; else hi = m; }
    const count = Math.max(1, lo - a);
    lines[k].geometry.setDrawRange(0, count);
    const h = a + count - 1;
    heads[3 * k] = P[3 * h]; heads[3 * k + 1] = P[3 * h + 1]; heads[3 * k + 2] = P[3 * h + 2];
  }
  headGeo.attributes.position.needsUpdate = true;
  const [k, unit] = tMax >= 1e-3 ? [1e3, 'ms'] : tMax >= 1e-6 ? [1e6, 'µs'] : [1e9, 'ns'];
  label.textContent = 't = ' + (t * k).toFixed(3) + ' ' + unit;
}
slider.addEventListener('input', () => showTime(slider.value / 1000));

const box = data.bounds;
const center = new THREE.Vector3((box[0] + box[3]) / 2, (box[1] + box[4]) / 2, (box[2] + box[5]) / 2);
const radius = 0.5 * Math.hypot(box[3] - box[0], box[4] - box[1], box[5] - box[2]);
const controls = new OrbitControls(camera, renderer.domElement);
controls.target.copy(center);
const presets = { iso: [-0.78, 0.52, -0.5], axial: [0, 0, 1], side: [-1, 0, 0] };
function preset(name) {
  const d = new THREE.Vector3(...presets[name]).normalize();
  camera.up.set(0, 1, 0);
  // Start from the bounding-sphere distance, then pull in until the box corners fill 90 % of the view.
  let dist = radius / Math.sin(THREE.MathUtils.degToRad(15));
  const p = new THREE.Vector3();
  for (let it = 0; it < 4; it++) {
    camera.position.copy(center).addScaledVector(d, dist);
    camera.lookAt(center);
    camera.updateMatrixWorld(true);
    let ext = 0;
    for (let i = 0; i < 8; i++) {
      p.set(i & 1 ? box[3] : box[0], i & 2 ? box[4] : box[1], i & 4 ? box[5] : box[2]).project(camera);
      ext = Math.max(ext, Math.abs(p.x), Math.abs(p.y));
    }
    dist *= Math.max(0.2, ext / 0.9);
  }
  camera.position.copy(center).addScaledVector(d, dist);
  controls.update();
}
for (const b of document.querySelectorAll('[data-camera]')) b.addEventListener('click', () => preset(b.dataset.camera));

let playing = false, last = 0;
const play = document.getElementById('play');
play.addEventListener('click', () => { playing = !playing; play.textContent = playing ? 'pause' : 'play'; last = performance.now(); });

function resize() {
  const w = view.clientWidth, h = view.clientHeight;
  renderer.setSize(w, h, false);
  renderer.domElement.style.width = w + 'px';
  renderer.domElement.style.height = h + 'px';
  camera.aspect = w / Math.max(1, h);
  camera.near = radius / 50; camera.far = radius * 50;
  camera.updateProjectionMatrix();
}
window.addEventListener('resize', resize);
resize();
preset(data.camera);
slider.value = 1000;
showTime(1);
renderer.setAnimationLoop((now) => {
  if (playing) {
    const f = Math.min(1, Number(slider.value) / 1000 + (now - last) / 8000);
    last = now;
    slider.value = Math.round(f * 1000);
    showTime(f);
    if (f >= 1) { playing = false; play.textContent = 'play'; }
  }
  controls.update();
  renderer.render(scene, camera);
});
document.body.dataset.ready = 'yes';
`;
