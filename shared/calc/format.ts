/** Formatting lives with parsing in quantity.ts (one trade style, documented there). */
export { formatLength, formatNumber, formatQuantity, formatSlope } from './quantity';
export type { FormatOptions } from './quantity';
