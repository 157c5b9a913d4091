/** The vehicle's telemetry log, interpolated values and dive statistics. */
export {};
