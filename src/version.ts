/** The software version printed on reports and exports; kept equal to package.json by a unit test. */
export const VERSION = '0.1.0';
