/** Public surface of the linear model layer. Other folders import only from here. */
export * from "./stateSpace";
export * from "./polynomial";
export * from "./balanceStateSpace";
export * from "./sisoZeros";
export * from "./transferFunction";
export * from "./zeroPoleGain";
export * from "./interconnect";
export * from "./discretize";
export * from "./delay";
