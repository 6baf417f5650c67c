export { parseStl } from "./parseStl.js";
export { parseObj } from "./parseObj.js";
export { parsePly, parsePlyVertices } from "./parsePly.js";
export { weldVertices } from "./weld.js";
export { meshCenterline } from "./meshCenterline.js";
export { readStlTraces, readObjTraces, readPlyMeshTraces, type MeshTraceOptions } from "./readMesh.js";
export type { Mesh, MeshReadOptions, CenterlineOptions, BranchPolicy } from "./types.js";
