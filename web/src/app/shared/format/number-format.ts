// The product's one number format lives in the shared analysis module (screen, PDF, CSV, mails, CLI).
export {
  DASH,
  EPSILON_UNIT,
  formatAbsorbance,
  formatK,
  formatKValue,
  formatNumber,
  formatPercent,
  formatQuantity,
  kUnit,
  kUnitOf,
  significantDigits,
  superscript,
} from '@equilight/analysis';
