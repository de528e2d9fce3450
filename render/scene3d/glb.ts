// The run's 3D scene as glTF 2.0 binary (.glb) through three's GLTFExporter (three 0.187,
// examples/jsm/exporters/GLTFExporter.js). Trajectories are LINE_STRIP primitives with COLOR_0.
// Electrodes go out whole, each a closed solid: a viewer of the file orbits and sections it
// itself, so the PNG's cut toward one camera (and its rod drawn as an outline) has no place here.

import * as THREE from 'three';
import { GLTFExporter } from 'three/examples/jsm/exporters/GLTFExporter.js';
import type { CameraName } from './cameras.js';
import type { RodShape } from './electrodes.js';
import { installFileReaderShim } from './nodeShim.js';
import type { RunView } from './runInput.js';
import { buildScene } from './sceneGraph.js';
import type { ColorBy } from './trajectoryColors.js';

export interface GlbOptions { color: ColorBy; rods: RodShape; camera: CameraName }

export async function renderGlb(run: RunView, opts: GlbOptions): Promise<Uint8Array> {
  installFileReaderShim();
  const built = buildScene(run, { rods: opts.rods, color: opts.color, scaleAxis: opts.camera === 'axial' ? 'x' : 'z' });
  const scene = built.scene;
  // glTF's material is metallic-roughness PBR; a Lambert surface maps to rough, non-metallic.
  const pbr = new Map<THREE.Material, THREE.MeshStandardMaterial>();
  // Line colours go out as unlit base colours (glTF has no line material of its own).
  const unlit = new Map<THREE.Material, THREE.MeshBasicMaterial>();
  scene.traverse((o) => {
    const line = o as THREE.Line;
    if (line.isLine) {
      const m = line.material as THREE.LineBasicMaterial;
      if (!unlit.has(m)) {
        unlit.set(m, new THREE.MeshBasicMaterial({ name: m.name, color: m.color, vertexColors: m.vertexColors, transparent: m.transparent, opacity: m.opacity }));
      }
      line.material = unlit.get(m)!;
      return;
    }
    const mesh = o as THREE.Mesh;
    if (!mesh.isMesh) return;
    const m = mesh.material as THREE.MeshLambertMaterial;
    if (!pbr.has(m)) {
      pbr.set(m, new THREE.MeshStandardMaterial({ name: m.name, color: m.color, roughness: 0.55, metalness: 0.35, side: THREE.DoubleSide }));
    }
    mesh.material = pbr.get(m)!;
  });
  scene.userData = {
    units: 'mm', tool_version: run.toolVersion, seed: run.seed, scene_name: run.sceneName,
    scale_bar_mm: built.scaleBarMm, color_by: opts.color,
    electrode_labels: built.labels.map((l) => l.text),
  };
  const out = await new GLTFExporter().parseAsync(scene, { binary: true, onlyVisible: true });
  return new Uint8Array(out as ArrayBuffer);
}

export interface GlbParts { json: Record<string, any>; bin: Uint8Array; version: number; length: number }

/** Split a .glb into its JSON and BIN chunks (glTF 2.0 spec §4.4, "GLB File Format Specification"). */
export function parseGlb(bytes: Uint8Array): GlbParts {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.byteLength < 20 || dv.getUint32(0, true) !== 0x46546c67) throw new Error('not a GLB file (magic is not "glTF")');
  const version = dv.getUint32(4, true), length = dv.getUint32(8, true);
  const jsonLen = dv.getUint32(12, true);
  if (dv.getUint32(16, true) !== 0x4e4f534a) throw new Error('first GLB chunk is not JSON');
  const json = JSON.parse(new TextDecoder().decode(bytes.subarray(20, 20 + jsonLen)));
  const o = 20 + jsonLen;
  let bin: Uint8Array = new Uint8Array(0);
  if (o + 8 <= bytes.byteLength) {
    const binLen = dv.getUint32(o, true);
    if (dv.getUint32(o + 4, true) !== 0x004e4942) throw new Error('second GLB chunk is not BIN');
    bin = bytes.subarray(o + 8, o + 8 + binLen);
  }
  return { json, bin, version, length };
}
