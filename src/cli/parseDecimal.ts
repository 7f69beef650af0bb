/** The one decimal-number parser (core: ../io/parseDecimal.ts), re-exported for the CLI. */
export { parseDecimal } from '../io/parseDecimal.js';
