/** Gas constant in J/(mol K) (exact SI 2019 value); one value for fitting and prediction. */
export const R = 8.314462618;
/** Offset from degC to kelvin. */
export const KELVIN_OFFSET = 273.15;
/** Boltzmann constant in J/K (exact SI 2019 value). */
export const BOLTZMANN = 1.380649e-23;
/** Planck constant in J s (exact SI 2019 value). */
export const PLANCK = 6.62607015e-34;
/** Version of the engine, stored with every computed plan. */
export const MODEL_VERSION = 'yieldpoint-kinetics/1.0.0';
