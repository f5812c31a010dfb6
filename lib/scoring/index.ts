export * from "./model";
export * from "./flag";
export * from "./hl7";
export * from "./zlog";
export * from "./cautions";
export * from "./gaussian";
export * from "./empirical";
export * from "./score";
