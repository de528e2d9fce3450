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
// Colours come per point as sRGB bytes; vertex colours are linear in three's pipeline.
const toLinear = Float32Array.from({ length: 256 }, (_, v) => new THREE.Color().setRGB(v / 255, 0, 0, THREE.SRGBColorSpace).r);
for (let k = 0; k < n; k++) {
  const a = S[k], b = S[k + 1];
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.BufferAttribute(P.subarray(3 * a, 3 * b), 3));
  const col = new Float32Array(3 * (b - a));
  for (let i = 0; i < 3 * (b - a); i++) col[i] = toLinear[C[3 * a + i]];
  headColors.set(col.subarray(Math.max(0, col.length - 3)), 3 * k);
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

// Labels in the canvas: sprites of canvas-drawn text, a fixed size on screen (sizeAttenuation off),
// drawn over the scene (no depth test) so a label is never hidden behind an electrode.
const labelSprites = [];
function textSprite(item, lane) {
  const px = item.kind === 'axis' ? 15 : 13, pad = item.kind === 'electrode' ? 5 : 2, k = 2;
  const c = document.createElement('canvas');
  const ctx = c.getContext('2d');
  const font = (item.kind === 'axis' ? 'bold ' : '') + (px * k) + 'px "DejaVu Sans", "Liberation Sans", sans-serif';
  ctx.font = font;
  const w = Math.ceil(ctx.measureText(item.text).width + 2 * pad * k), h = Math.ceil((px + 2 * pad + 4) * k);
  c.width = w; c.height = h;
  ctx.font = font;
  if (item.kind === 'electrode') {
    ctx.fillStyle = 'rgba(251,250,246,0.9)'; ctx.strokeStyle = 'rgba(36,38,43,0.4)'; ctx.lineWidth = k;
    ctx.beginPath(); ctx.roundRect(k, k, w - 2 * k, h - 2 * k, 3 * k); ctx.fill(); ctx.stroke();
  }
  ctx.fillStyle = item.color; ctx.textBaseline = 'middle';
  ctx.fillText(item.text, pad * k, h / 2 + k);
  const tex = new THREE.CanvasTexture(c);
  tex.colorSpace = THREE.SRGBColorSpace;
  tex.generateMipmaps = false;
  tex.minFilter = THREE.LinearFilter;
  const sprite = new THREE.Sprite(new THREE.SpriteMaterial({ map: tex, sizeAttenuation: false, depthTest: false, depthWrite: false, transparent: true }));
  sprite.userData = { wPx: w / k, hPx: h / k };
  // Electrode labels sit up and right of their anchor, each a lane higher than the one before so
  // neighbours do not overlap; the scale text hangs centred below the bar.
  if (item.kind === 'electrode') sprite.center.set(-0.06, -0.45 - 1.25 * lane);
  else if (item.kind === 'scale') sprite.center.set(0.5, 1);
  sprite.position.set(item.at[0], item.at[1], item.at[2]);
  sprite.renderOrder = 10;
  sprite.name = 'label ' + item.text;
  return sprite;
}
const anchorPos = [];
let lane = 0;
for (const item of data.labels) {
  const s = textSprite(item, item.kind === 'electrode' ? lane++ : 0);
  labelSprites.push(s);
  scene.add(s);
  if (item.kind === 'electrode') anchorPos.push(...item.at);
}
const anchorDots = new THREE.Points(new THREE.BufferGeometry().setAttribute('position', new THREE.BufferAttribute(new Float32Array(anchorPos), 3)),
  new THREE.PointsMaterial({ size: 5, sizeAttenuation: false, color: 0x24262b, depthTest: false }));
anchorDots.renderOrder = 10;
scene.add(anchorDots);
document.body.dataset.labels = data.labels.map((l) => l.text).join('|');
const labelsButton = document.getElementById('labels');
labelsButton.addEventListener('click', () => {
  const on = labelsButton.getAttribute('aria-pressed') !== 'true';
  labelsButton.setAttribute('aria-pressed', String(on));
  for (const s of labelSprites) s.visible = on;
  anchorDots.visible = on;
});
/** Sprite scale for a size in pixels: with sizeAttenuation off, 1 unit spans 2·tan(fov/2) of the view height. */
function sizeLabels(hPx) {
  const unit = 2 * Math.tan(THREE.MathUtils.degToRad(camera.fov / 2)) / Math.max(1, hPx);
  for (const s of labelSprites) s.scale.set(s.userData.wPx * unit, s.userData.hPx * unit, 1);
}

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
  sizeLabels(h);
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
