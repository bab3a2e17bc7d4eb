/* Version 1 of the risk scales: Plumbline's default capsule wording, published by the demo administrator. */

export const firstRiskScaleNote =
  'First version: default 1-10 severity, occurrence and detection scales for hard-capsule filling, to be reviewed by the site.';
