export { parseSvgPaths } from "./parseSvgPaths.js";
export { flattenPathData, type Subpath } from "./pathData.js";
export { arcCentre, arcPoint, type ArcCentre } from "./arc.js";
export { parseTransform, multiply, IDENTITY, type Affine } from "./transform.js";
export { calibrate, parseLength, type Calibration } from "./calibration.js";
export { tokenizeXml, type XmlToken } from "./xml.js";
export { decimateForDisplay } from "./decimateForDisplay.js";
export type { SvgOptions } from "./types.js";
