// Public API of the seawater library (science spec 2). Other code imports only this file.

export { vapourPressureAtm } from './vapour.js';
