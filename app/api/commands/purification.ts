/** Commands of the purification phase (filled in by that phase's work). */
export const purificationCommands = {};
