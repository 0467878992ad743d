import { PhotoRow } from '../features/photos/photo.entity';
import { Venue } from '../features/venue/venue.entity';
import { Person } from '../features/people/person.entity';
import { VenueRole } from '../features/people/venue-role.entity';
import { BrickTypeRow } from '../features/schedule/brick-type.entity';
import { LineSetRow } from '../features/schedule/line-set.entity';
import { PieceRow } from '../features/schedule/piece.entity';
import { PracticeRunRow } from '../features/practice/practice.entity';
import { ScheduleChangeRow } from '../features/schedule/schedule-change.entity';
import { MailAttachmentRow, MailMessageRow } from '../features/mail/mail.entity';
import { ActionKeyRow, LoadingSessionRow, PresenceRow, SessionEventRow } from '../features/sessions/session.entity';

export const entities = [
  Venue, Person, VenueRole, BrickTypeRow, LineSetRow, PieceRow, ScheduleChangeRow, LoadingSessionRow, SessionEventRow, ActionKeyRow,
  PracticeRunRow, PresenceRow, MailMessageRow, MailAttachmentRow, PhotoRow,
];
