/** Commands of the review phase (filled in by that phase's work). */
export const reviewCommands = {};
