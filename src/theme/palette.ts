/**
 * Driftline's palette. The map colours double as the app's colours so that a person learns one
 * code: ink is mapped structure and the app's frame, warm paper is free space and the page,
 * pale slate is unknown space and every border.
 */
export const palette = {
  ink: '#1e2a3f',
  paper: '#f6f3ea',
  slate: '#d5dae3',
  amber: '#e38b1b',
  violet: '#6a4bd6',
  teal: '#1c9a8a',
} as const;
