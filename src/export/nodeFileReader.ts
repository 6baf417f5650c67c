/**
 * A minimal FileReader for Node 20, which has Blob but not FileReader; three's GLTFExporter needs
 * readAsArrayBuffer and readAsDataURL to build .glb files. Browsers keep their own FileReader.
 */
type Handler = ((this: unknown, ev: unknown) => void) | null;

class NodeFileReader {
  result: ArrayBuffer | string | null = null;
  error: unknown = null;
  readyState = 0;
  onload: Handler = null;
  onloadend: Handler = null;
  onerror: Handler = null;

  private run(blob: Blob, convert: (ab: ArrayBuffer) => ArrayBuffer | string): void {
    this.readyState = 1;
    blob.arrayBuffer().then(
      (ab) => {
        this.result = convert(ab);
        this.readyState = 2;
        this.onload?.call(this, { target: this });
        this.onloadend?.call(this, { target: this });
      },
      (e: unknown) => {
        this.error = e;
        this.readyState = 2;
        this.onerror?.call(this, { target: this });
        this.onloadend?.call(this, { target: this });
      },
    );
  }

  readAsArrayBuffer(blob: Blob): void {
    this.run(blob, (ab) => ab);
  }

  readAsDataURL(blob: Blob): void {
    this.run(blob, (ab) => `data:${blob.type || "application/octet-stream"};base64,${Buffer.from(ab).toString("base64")}`);
  }

  readAsText(blob: Blob): void {
    this.run(blob, (ab) => new TextDecoder().decode(ab));
  }
}

/** Installs the polyfill as globalThis.FileReader when there is none (idempotent). */
export function installFileReader(): void {
  const g = globalThis as { FileReader?: unknown };
  if (typeof g.FileReader === "undefined") g.FileReader = NodeFileReader;
}
