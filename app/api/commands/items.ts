/** Commands of the items phase (filled in by that phase's work). */
export const itemsCommands = {};
