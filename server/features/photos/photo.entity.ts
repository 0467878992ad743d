import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

const bigint = { to: (v: number) => v, from: (v: string | number) => Number(v) };

/** A photo of a hang: on a line set, or on one of its pieces. The image files are under the data folder. */
@Entity({ name: 'photo' })
export class PhotoRow {
  @PrimaryGeneratedColumn({ type: 'int', unsigned: true })
  id: number;

  @Column({ type: 'int', unsigned: true, name: 'venue_id' })
  venueId: number;

  @Column({ type: 'int', unsigned: true, name: 'line_set_id' })
  lineSetId: number;

  @Column({ type: 'int', unsigned: true, name: 'piece_id', nullable: true })
  pieceId: number | null;

  /** Made by the server, never from the uploaded name. */
  @Column({ type: 'varchar', length: 80, name: 'file_name' })
  fileName: string;

  @Column({ type: 'varchar', length: 80, name: 'thumb_name' })
  thumbName: string;

  @Column({ type: 'int', unsigned: true })
  width: number;

  @Column({ type: 'int', unsigned: true })
  height: number;

  @Column({ type: 'int', unsigned: true })
  bytes: number;

  @Column({ type: 'varchar', length: 200 })
  caption: string;

  /** Set for the demo's own drawings: the server draws the file again when it is missing. */
  @Column({ type: 'varchar', length: 40, nullable: true })
  drawn: string | null;

  @Column({ type: 'int', unsigned: true, name: 'uploaded_by', nullable: true })
  uploadedBy: number | null;

  @Column({ type: 'bigint', unsigned: true, name: 'uploaded_at_ms', transformer: bigint })
  uploadedAtMs: number;
}
