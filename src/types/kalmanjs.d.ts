/** kalmanjs 1.1 ships no types. Note its names: R is the process noise, Q the measurement noise. */
declare module 'kalmanjs' {
  export interface KalmanOptions {
    /** Process noise. @default 1 */
    R?: number;
    /** Measurement noise. @default 1 */
    Q?: number;
    /** State transition. @default 1 */
    A?: number;
    /** Control gain. @default 0 */
    B?: number;
    /** Measurement gain. @default 1 */
    C?: number;
  }
  export default class KalmanFilter {
    constructor(options?: KalmanOptions);
    R: number;
    Q: number;
    A: number;
    B: number;
    C: number;
    cov: number;
    x: number;
    filter(z: number, u?: number): number;
    predict(u?: number): number;
    uncertainty(): number;
    lastMeasurement(): number;
    setMeasurementNoise(noise: number): void;
    setProcessNoise(noise: number): void;
  }
}
