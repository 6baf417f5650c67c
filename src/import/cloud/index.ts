export { orderCloud } from "./orderCloud.js";
export { parseCloudText } from "./parseCloudText.js";
export { readCloudText, readCloudPly } from "./readCloud.js";
export type { CloudOptions, OrderedCloud, SideBranch } from "./types.js";
