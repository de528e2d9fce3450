// Electrodes and guides flattened for the HTML viewer: each mesh or line object with its world
// matrix baked into the positions, as base64 Float32 so the page rebuilds it with plain
// BufferGeometry (no loader needed in the browser).

import * as THREE from 'three';

export interface FlatObject {
  kind: 'mesh' | 'segments' | 'strip';
  name: string;
  color: string;
  opacity: number;
  position: string;
  normal?: string;
  index?: string;
}

export const b64 = (a: ArrayBufferView): string => Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');

export function flattenObjects(root: THREE.Object3D): FlatObject[] {
  root.updateMatrixWorld(true);
  const out: FlatObject[] = [];
  const nm = new THREE.Matrix3();
  const v = new THREE.Vector3();
  root.traverseVisible((obj) => {
    const mesh = obj as THREE.Mesh, line = obj as THREE.Line;
    if (!mesh.isMesh && !line.isLine) return;
    const geo = (obj as THREE.Mesh).geometry as THREE.BufferGeometry;
    const mat = (obj as THREE.Mesh).material as THREE.MeshLambertMaterial;
    const pos = geo.getAttribute('position');
    const p = new Float32Array(3 * pos.count);
    for (let i = 0; i < pos.count; i++) {
      v.fromBufferAttribute(pos, i).applyMatrix4(obj.matrixWorld);
      p[3 * i] = v.x; p[3 * i + 1] = v.y; p[3 * i + 2] = v.z;
    }
    const item: FlatObject = {
      kind: mesh.isMesh ? 'mesh' : (line as THREE.LineSegments).isLineSegments ? 'segments' : 'strip',
      name: obj.name, color: '#' + mat.color.getHexString(),
      opacity: mat.transparent ? mat.opacity : 1, position: b64(p),
    };
    if (mesh.isMesh) {
      if (!geo.getAttribute('normal')) geo.computeVertexNormals();
      const nor = geo.getAttribute('normal');
      nm.getNormalMatrix(obj.matrixWorld);
      const n = new Float32Array(3 * nor.count);
      for (let i = 0; i < nor.count; i++) {
        v.fromBufferAttribute(nor, i).applyMatrix3(nm).normalize();
        n[3 * i] = v.x; n[3 * i + 1] = v.y; n[3 * i + 2] = v.z;
      }
      item.normal = b64(n);
      const index = geo.getIndex();
      if (index) item.index = b64(Uint32Array.from(index.array as ArrayLike<number>));
    }
    out.push(item);
  });
  return out;
}
