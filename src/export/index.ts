export { formatNumber, jsonNumber, OUTPUT_DIGITS } from "./formatNumber.js";
export { defaultOutputUnit, resolveOutputUnit } from "./outputUnit.js";
export { ESTIMATE_NOTE, FLAG_MEANINGS, PROFILE_COLUMNS } from "./profileTable.js";
export { profileToCsv } from "./profileToCsv.js";
export { PROFILE_JSON_FORMAT, PROFILE_JSON_VERSION, profileToJson } from "./profileToJson.js";
export { sameFile } from "./sameFile.js";
export type { ProfileWriteOptions } from "./types.js";
export { TOOL_NAME, TOOL_VERSION } from "./version.js";
export { writeFileAtomic, type WriteFileAtomicOptions } from "./writeFileAtomic.js";
