/**
 * GET /api/worklists: the signed-in user's work lists on the home page (REQUIREMENTS: a bench that tells the
 * chemist what is waiting). Each list is present only for the roles that act on it:
 *   awaitingVerification  records signed "prepared" that this user may verify (chemists; not their own work)
 *   toWeighOrMakeUp       planned records still to be weighed (or pipetted) or made up (chemists, technicians)
 *   expiringSoon          live records expiring within the lab's notice period (a chemist: the ones they planned;
 *                         technician, QA and admin: the whole lab)
 */
import type { PersonRef, PreparationStage, PreparationStatus, Quantity } from './preparations.ts';

export interface WorkItem {
  id: number;
  identifier: string;
  status: PreparationStatus;
  stage?: PreparationStage;
  materialName: string;
  analyteFormula: string;
  target: Quantity;
  concentrationDisplay?: string;
  createdBy: PersonRef;
  expiresOn: string;
  /** lab calendar days from today to expiresOn (0 = expires today) */
  daysLeft: number;
  /** planned by the signed-in user */
  mine: boolean;
  /** what to do next, in words ("Weigh", "Make up", "Verify", "Expires in 3 days") */
  next: string;
}

export interface WorkList {
  items: WorkItem[];
  /** how many match (items holds at most WORKLIST_LIMIT) */
  total: number;
  /** who the list covers, in words */
  scope: string;
}

export const WORKLIST_LIMIT = 50;

export interface WorkLists {
  /** the lab date the lists are for */
  today: string;
  noticeDays: number;
  awaitingVerification?: WorkList;
  toWeighOrMakeUp?: WorkList;
  expiringSoon?: WorkList;
}
