// The product's one number format lives in the shared analysis module (screen, PDF, CSV, mails, CLI).
export {
  DASH,
  formatAbsorbance,
  formatK,
  formatKValue,
  formatNumber,
  formatPercent,
  formatQuantity,
  kUnit,
  kUnitOf,
  superscript,
} from '@equilight/analysis';
