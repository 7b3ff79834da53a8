/** Commands of the pilot phase (filled in by that phase's work). */
export const pilotCommands = {};
