import { existsSync } from "node:fs";
import { fileURLToPath, pathToFileURL } from "node:url";

/** esbuild settings of the viewer bundle (one self-contained IIFE, three.js included). */
export const VIEWER_BUILD = {
  bundle: true,
  format: "iife",
  platform: "browser",
  target: "es2022",
  minify: true,
  write: false,
  legalComments: "none",
} as const;

/** Name of the generated module that carries the bundle into dist/ (written by writeViewerBundle.ts). */
export const GENERATED_MODULE = "viewerBundle.generated.js";

let cached: Promise<string> | undefined;

/** The viewer's entry file next to this module (running from source), else the source tree beside dist/. */
function viewerSource(): string | null {
  for (const rel of ["./viewer/main.ts", "../../../src/report/viewer/main.ts"]) {
    const path = fileURLToPath(new URL(rel, import.meta.url));
    if (existsSync(path)) return path;
  }
  return null;
}

/** Bundles the viewer (three.js included) in memory with esbuild. Cost: about 0.5 s. */
export async function bundleViewer(entry: string): Promise<string> {
  const esbuild = await import("esbuild");
  const result = await esbuild.build({ ...VIEWER_BUILD, entryPoints: [entry] });
  const out = result.outputFiles?.[0]?.text;
  if (out === undefined) throw new Error("esbuild produced no viewer bundle");
  return out;
}

/**
 * The report viewer's JavaScript (three.js and the viewer, bundled, minified), to inline in report.html.
 * Order: the generated module (`viewerBundle.generated.js`, made at build time by
 * writeViewerBundle.ts; the only choice in an installed package without sources), unless the viewer
 * sources are present, in which case it is bundled in memory from them with esbuild (a source
 * checkout: tsx, vitest, or dist/ built beside src/), so that the report always matches the code.
 * Memoised per process.
 * @throws {Error} when neither the generated module nor the sources (with esbuild) are available.
 */
export function viewerScript(): Promise<string> {
  cached ??= load();
  return cached;
}

async function load(): Promise<string> {
  const source = viewerSource();
  if (source !== null) {
    try {
      return await bundleViewer(source);
    } catch (e) {
      const generated = await loadGenerated();
      if (generated !== null) return generated;
      throw e;
    }
  }
  const generated = await loadGenerated();
  if (generated !== null) return generated;
  throw new Error(
    "the report viewer bundle is missing: build it with `npx tsx src/report/writeViewerBundle.ts` before `tsc -p tsconfig.build.json`",
  );
}

async function loadGenerated(): Promise<string | null> {
  const url = new URL(`./${GENERATED_MODULE}`, import.meta.url);
  if (!existsSync(fileURLToPath(url))) return null;
  const mod = (await import(pathToFileURL(fileURLToPath(url)).href)) as { VIEWER_JS?: unknown };
  return typeof mod.VIEWER_JS === "string" ? mod.VIEWER_JS : null;
}
