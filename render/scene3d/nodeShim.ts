// three's GLTFExporter reads its merged buffers through the browser's FileReader. Node 20 has
// Blob but no FileReader; this installs the two methods the exporter calls, on Blob.arrayBuffer().

interface MiniReader {
  result: ArrayBuffer | string | null;
  onloadend: (() => void) | null;
  readAsArrayBuffer(b: Blob): void;
  readAsDataURL(b: Blob): void;
}

class NodeFileReader implements MiniReader {
  result: ArrayBuffer | string | null = null;
  onloadend: (() => void) | null = null;
  readAsArrayBuffer(b: Blob): void {
    void b.arrayBuffer().then((buf) => { this.result = buf; this.onloadend?.(); });
  }
  readAsDataURL(b: Blob): void {
    void b.arrayBuffer().then((buf) => {
      this.result = `data:${b.type || 'application/octet-stream'};base64,${Buffer.from(buf).toString('base64')}`;
      this.onloadend?.();
    });
  }
}

export function installFileReaderShim(): void {
  const g = globalThis as { FileReader?: unknown };
  if (typeof g.FileReader === 'undefined') g.FileReader = NodeFileReader;
}
