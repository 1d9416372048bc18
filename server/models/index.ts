/**
 * Initialises every model on the shared Sequelize instance and declares ALL associations, in one place.
 * Import models from here (not from their files) so they are always initialised before use.
 */
import type { Transaction } from 'sequelize';
import { sequelize } from '../db';
import { AthleteProfile, initAthleteProfile } from './athlete-profile';
import { BillingEvent, initBillingEvent } from './billing-event';
import { BillingInvoice, initBillingInvoice } from './billing-invoice';
import { Calibration, initCalibration } from './calibration';
import { Clip, initClip } from './clip';
import { Club, initClub } from './club';
import { ClubBall, initClubBall } from './club-ball';
import { ClubSubscription, initClubSubscription } from './club-subscription';
import { CoachNote, initCoachNote } from './coach-note';
import { Fit, initFit } from './fit';
import { Flight, initFlight } from './flight';
import { FlightAction, initFlightAction } from './flight-action';
import { FlightCameraMotion, initFlightCameraMotion } from './flight-camera-motion';
import { Invitation, initInvitation } from './invitation';
import { Job, initJob } from './job';
import { Membership, initMembership } from './membership';
import { PasswordReset, initPasswordReset } from './password-reset';
import { Session, initSession } from './session';
import { TrackPoint, initTrackPoint } from './track-point';
import { User, initUser } from './user';
import { WorkloadEntry, initWorkloadEntry } from './workload-entry';
import { WorkloadThreshold, initWorkloadThreshold } from './workload-threshold';

initUser(sequelize);
initClub(sequelize);
initMembership(sequelize);
initAthleteProfile(sequelize);
initSession(sequelize);
initClip(sequelize);
initCalibration(sequelize);
initFlightAction(sequelize);
initClubBall(sequelize);
initFlight(sequelize);
initTrackPoint(sequelize);
initFlightCameraMotion(sequelize);
initFit(sequelize);
initJob(sequelize);
initInvitation(sequelize);
initPasswordReset(sequelize);
initClubSubscription(sequelize);
initBillingEvent(sequelize);
initBillingInvoice(sequelize);
initWorkloadEntry(sequelize);
initWorkloadThreshold(sequelize);
initCoachNote(sequelize);

// Foreign keys are `<model>_id` columns; deleting a club removes its memberships and profiles (see migrations).
User.hasMany(Membership, { foreignKey: 'userId', as: 'memberships' });
Membership.belongsTo(User, { foreignKey: 'userId', as: 'user' });
Club.hasMany(Membership, { foreignKey: 'clubId', as: 'memberships' });
Membership.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });
Club.hasMany(AthleteProfile, { foreignKey: 'clubId', as: 'athleteProfiles' });
AthleteProfile.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });
User.hasMany(AthleteProfile, { foreignKey: 'userId', as: 'athleteProfiles' });
AthleteProfile.belongsTo(User, { foreignKey: 'userId', as: 'user' });

// Deleting a session removes its clips, their flights, points, fits, calibrations and jobs (ON DELETE CASCADE in the migrations);
// the service removes the stored files after the commit.
Club.hasMany(Session, { foreignKey: 'clubId', as: 'sessions' });
Session.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });
Session.hasMany(Clip, { foreignKey: 'sessionId', as: 'clips' });
Clip.belongsTo(Session, { foreignKey: 'sessionId', as: 'session' });
Clip.hasMany(Flight, { foreignKey: 'clipId', as: 'flights' });
Flight.belongsTo(Clip, { foreignKey: 'clipId', as: 'clip' });
Clip.hasMany(Calibration, { foreignKey: 'clipId', as: 'calibrations' });
Calibration.belongsTo(Clip, { foreignKey: 'clipId', as: 'clip' });
AthleteProfile.hasMany(Flight, { foreignKey: 'athleteProfileId', as: 'flights' });
Flight.belongsTo(AthleteProfile, { foreignKey: 'athleteProfileId', as: 'athlete' });
Flight.hasMany(TrackPoint, { foreignKey: 'flightId', as: 'points' });
TrackPoint.belongsTo(Flight, { foreignKey: 'flightId', as: 'flight' });
Flight.hasMany(Fit, { foreignKey: 'flightId', as: 'fits' });
Flight.hasOne(FlightCameraMotion, { foreignKey: 'flightId', as: 'cameraMotion' });
Fit.belongsTo(Flight, { foreignKey: 'flightId', as: 'flight' });

/**
 * Keeps `flights.latest_fit_id` and the latest fit's figures on the flight (migration 0320) in the transaction
 * that adds the fit; the Flights list sorts by them. Fits are only ever added (a refit adds a row).
 */
async function markLatestFits(fits: readonly Fit[], transaction: Transaction | null | undefined): Promise<void> {
  const finite = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  for (const fit of fits) {
    await sequelize.query(
      `UPDATE flights SET latest_fit_id = :fitId, fit_launch_speed_mps = :speed, fit_launch_angle_deg = :angle, fit_carry_m = :carry,
              fit_standard_carry_m = :standardCarry
        WHERE id = :flightId AND (latest_fit_id IS NULL OR latest_fit_id < :fitId)`,
      {
        replacements: {
          fitId: fit.id,
          flightId: fit.flightId,
          speed: finite(fit.launchSpeedMps),
          angle: finite(fit.launchAngleDeg),
          carry: finite(fit.carryM),
          standardCarry: finite(fit.result?.standardCarry),
        },
        transaction: transaction ?? undefined,
      },
    );
  }
}
Fit.afterCreate((fit, options) => markLatestFits([fit], options.transaction));
Fit.afterBulkCreate((fits, options) => markLatestFits(fits, options.transaction));
Club.hasMany(FlightAction, { foreignKey: 'clubId', as: 'flightActions' });
Club.hasMany(ClubBall, { foreignKey: 'clubId', as: 'balls' });
Club.hasMany(Job, { foreignKey: 'clubId', as: 'jobs' });

// Deleting a club removes its invitations; a deleted profile or inviter leaves the invitation with a null link.
Club.hasMany(Invitation, { foreignKey: 'clubId', as: 'invitations' });
Invitation.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });
Invitation.belongsTo(User, { foreignKey: 'invitedByUserId', as: 'invitedBy' });
Invitation.belongsTo(User, { foreignKey: 'acceptedUserId', as: 'acceptedUser' });
Invitation.belongsTo(AthleteProfile, { foreignKey: 'athleteProfileId', as: 'athleteProfile' });
User.hasMany(PasswordReset, { foreignKey: 'userId', as: 'passwordResets' });
PasswordReset.belongsTo(User, { foreignKey: 'userId', as: 'user' });

// Deleting a club removes its subscription row and invoices (ON DELETE CASCADE in the migrations).
Club.hasOne(ClubSubscription, { foreignKey: 'clubId', as: 'subscription' });
ClubSubscription.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });
Club.hasMany(BillingInvoice, { foreignKey: 'clubId', as: 'invoices' });
BillingInvoice.belongsTo(Club, { foreignKey: 'clubId', as: 'club' });

// Workload entries and thresholds go with their club (and an entry with its athlete); notes go with their
// flight or session, and keep their text when the author's account is deleted (author_user_id SET NULL).
Club.hasMany(WorkloadEntry, { foreignKey: 'clubId', as: 'workloadEntries' });
AthleteProfile.hasMany(WorkloadEntry, { foreignKey: 'athleteProfileId', as: 'workloadEntries' });
Club.hasMany(WorkloadThreshold, { foreignKey: 'clubId', as: 'workloadThresholds' });
Flight.hasMany(CoachNote, { foreignKey: 'flightId', as: 'coachNotes' });
Session.hasMany(CoachNote, { foreignKey: 'sessionId', as: 'coachNotes' });
CoachNote.belongsTo(User, { foreignKey: 'authorUserId', as: 'author' });

export {
  sequelize,
  AthleteProfile,
  BillingEvent,
  BillingInvoice,
  Calibration,
  Clip,
  Club,
  ClubBall,
  ClubSubscription,
  CoachNote,
  Fit,
  Flight,
  FlightAction,
  FlightCameraMotion,
  Invitation,
  Job,
  Membership,
  PasswordReset,
  Session,
  TrackPoint,
  User,
  WorkloadEntry,
  WorkloadThreshold,
};
