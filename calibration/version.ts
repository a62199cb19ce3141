/** Version of the calibration core, stored with every fit so a result can be traced to the code. */
export const CORE_VERSION = '0.1.0';
