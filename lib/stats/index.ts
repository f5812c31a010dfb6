/**
 * The public surface of Bellwether's statistics engine. Pure functions, no I/O.
 */
export * from "./validate";
export * from "./descriptive";
export * from "./quantile";
export * from "./random";
export * from "./bootstrap";
export * from "./brent";
export * from "./brent-root";
export * from "./gauss-legendre";
export * from "./noncentral-t";
export * from "./box-cox";
export * from "./box-cox-lrt";
export * from "./rank-ci";
export * from "./nonparametric";
export * from "./nonparametric-censored";
export * from "./parametric";
export * from "./robust-horn";
export * from "./outliers";
export * from "./outliers-dixon";
export * from "./outliers-tukey";
export * from "./outliers-horn";
export * from "./outlier-screen";
export * from "./method-advice";
export * from "./estimate";
export * from "./shapiro-wilk";
export * from "./anderson-darling";
export * from "./qq-plot";
export * from "./histogram";
export * from "./harris-boyd";
export * from "./lahti";
export * from "./verification";
