export { buildTrace, DUPLICATE_REL_TOL, MIN_TRACE_POINTS, type RawTrace } from "./buildTrace.js";
export { parseDelimited } from "./parseDelimited.js";
export { parsePolylineJson, POLYLINE_SCHEMA, type PolylineDocument } from "./parsePolylineJson.js";
export { formatOfPath, readTraceFile, STDIN_NAME, type ReadTraceOptions, type TraceIo } from "./readTrace.js";
export { TRACE_READERS } from "./traceReaders.js";
export { DEFAULT_INPUT_UNIT, type BinaryTraceReader, type TextTraceReader, type TraceReadOptions, type TraceReader } from "./types.js";
export { badUnitProblem, parseUnitName } from "./unitName.js";
