// The PDF and the mails write numbers and units with the product's one number format.
export { formatNumber, kUnitOf as kPdfUnit } from '../analysis/number-format';
