/** Mesh formats `analyze --mesh` writes (a list apart from the encoders, so help texts need no three.js). */
export const MESH_FORMATS = ["ply", "stl", "obj", "glb"] as const;
export type MeshFormat = (typeof MESH_FORMATS)[number];
