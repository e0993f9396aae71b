import type { Sequelize } from 'sequelize';
import { AuditEvent } from './audit-event.ts';
import { Collection } from './collection.ts';
import { Embedding } from './embedding.ts';
import { Example } from './example.ts';
import { ExportFile, LedgerMailSetting } from './export-file.ts';
import { ImportBatch } from './import-batch.ts';
import { Item } from './item.ts';
import { Job } from './job.ts';
import { Run } from './run.ts';
import { SubjectModel } from './subject-model.ts';
import { Subject } from './subject.ts';
import { Suggestion } from './suggestion.ts';
import { UserToken } from './user-token.ts';
import { User } from './user.ts';
import { WorkerHeartbeat } from './worker-heartbeat.ts';
import { WeightMapVersion } from './weight-map.ts';
import { ItemTextRead, SecondReview } from './review.ts';

export { AuditEvent, Collection, Embedding, Example, ExportFile, Item, Job, Run, Subject, SubjectModel, Suggestion, User, UserToken, WorkerHeartbeat };
export { ImportBatch };
export { WeightMapVersion };
export { ItemTextRead, SecondReview };
export { LedgerMailSetting };
export { ROLES, type Role } from './user.ts';

let initialised: Sequelize | null = null;

/** Binds every model to one Sequelize instance and declares their associations (once per process). */
export function initModels(sequelize: Sequelize): void {
  if (initialised === sequelize) return;
  if (initialised) throw new Error('models are already bound to another Sequelize instance');
  initialised = sequelize;
  for (const m of [User, Collection, Subject, Item, Example, Embedding, SubjectModel, Suggestion, Run, Job, WorkerHeartbeat, AuditEvent, ExportFile, UserToken]) {
    m.initModel(sequelize);
  }
  ImportBatch.initModel(sequelize);
  ItemTextRead.initModel(sequelize);
  SecondReview.initModel(sequelize);
  WeightMapVersion.initModel(sequelize);
  LedgerMailSetting.initModel(sequelize);
  const fk = (name: string, allowNull = false) => ({ foreignKey: { name, allowNull } });

  Collection.hasMany(Subject, { ...fk('collectionId'), as: 'subjects' });
  Subject.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
  Subject.belongsTo(Subject, { ...fk('broaderId', true), as: 'broader' });
  Subject.hasMany(Subject, { ...fk('broaderId', true), as: 'narrower' });

  Collection.hasMany(Item, { ...fk('collectionId'), as: 'items' });
  Item.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
  Item.belongsTo(User, { ...fk('approvedBy', true), as: 'approver' });

  Subject.hasMany(Example, { ...fk('subjectId'), as: 'examples' });
  Example.belongsTo(Subject, { ...fk('subjectId'), as: 'subject' });
  Example.belongsTo(Item, { ...fk('itemId', true), as: 'item' });

  Subject.hasMany(SubjectModel, { ...fk('subjectId'), as: 'models' });
  SubjectModel.belongsTo(Subject, { ...fk('subjectId'), as: 'subject' });

  Item.hasMany(Suggestion, { ...fk('itemId'), as: 'suggestions' });
  Suggestion.belongsTo(Item, { ...fk('itemId'), as: 'item' });
  Subject.hasMany(Suggestion, { ...fk('subjectId'), as: 'suggestions' });
  Suggestion.belongsTo(Subject, { ...fk('subjectId'), as: 'subject' });
  Suggestion.belongsTo(SubjectModel, { ...fk('subjectModelId', true), as: 'subjectModel' });
  Suggestion.belongsTo(User, { ...fk('decidedBy', true), as: 'decider' });

  Collection.hasMany(Run, { ...fk('collectionId'), as: 'runs' });
  Run.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
  Run.hasMany(Job, { ...fk('runId', true), as: 'jobs' });

  User.hasMany(UserToken, { ...fk('userId'), as: 'tokens' });
  UserToken.belongsTo(User, { ...fk('userId'), as: 'user' });

  AuditEvent.belongsTo(User, { ...fk('actorId', true), as: 'actor' });
  ExportFile.belongsTo(Collection, { ...fk('collectionId', true), as: 'collection' });
  ExportFile.belongsTo(User, { ...fk('requestedBy', true), as: 'requester' });
  LedgerMailSetting.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
  ImportBatch.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
  Collection.hasMany(WeightMapVersion, { ...fk('collectionId'), as: 'weightMaps' });
  WeightMapVersion.belongsTo(Collection, { ...fk('collectionId'), as: 'collection' });
}
