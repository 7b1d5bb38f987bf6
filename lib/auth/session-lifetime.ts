/** How long a session lasts without activity: 12 hours (a working day and the evening after it). */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;
