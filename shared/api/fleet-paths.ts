/** API paths of the fleet (issue 6), apart from paths.ts like the findings' own. */
export const FLEET_API = {
  /** `?programId=&all=` */
  drivers: '/api/drivers',
  driver: (userId: string) => `/api/drivers/${userId}`,
  /** `?programId=&from=&to=&assetId=&driverId=&stageId=&purpose=&status=&mine=&overdue=` */
  assignments: '/api/assignments',
  assignment: (id: string) => `/api/assignments/${id}`,
  assignmentCancel: (id: string) => `/api/assignments/${id}/cancel`,
  assignmentCheckOut: (id: string) => `/api/assignments/${id}/check-out`,
  assignmentCheckIn: (id: string) => `/api/assignments/${id}/check-in`,
  assignmentHistory: (id: string) => `/api/assignments/${id}/history`,
  /** `?programId=&from=&to=` */
  utilisation: '/api/fleet/utilisation',
  proposals: '/api/fleet/proposals',
  proposalsAccept: '/api/fleet/proposals/accept',
  solver: '/api/calc/assignment',
} as const;

export const FLEET_ERROR_SENTENCES: Record<string, string> = {
  'assignment/refused': 'This assignment cannot be booked: see the reasons listed.',
  'assignment/closed': 'This assignment is returned or cancelled; it can no longer change.',
  'assignment/checked-out': 'The vehicle is checked out: only the end of the window can still change.',
  'assignment/not-checked-out': 'The vehicle has not been checked out yet.',
  'assignment/not-planned': 'Only a planned assignment can be checked out or cancelled.',
  'assignment/not-yours': 'Only the assigned driver, a coordinator or a lead can do this.',
  'assignment/too-early': 'It is too early to check this vehicle out.',
  'assignment/window-passed': 'The window of this assignment has passed; ask the coordinator to change it.',
};
