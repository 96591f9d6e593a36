/**
 * Tilldawn's power engine: pure functions on plain data, shared by the server and the phone.
 */
export * from "./model";
export * from "./state";
export * from "./explain";
export * from "./units";
export * from "./battery";
export * from "./draw";
export * from "./solar";
export * from "./projection";
export * from "./autonomy";
export * from "./cable";
export * from "./circuit-graph";
export * from "./audit";
export * from "./compare";
export * from "./capacity";
export * from "./api";
