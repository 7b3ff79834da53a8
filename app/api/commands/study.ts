import fs from 'node:fs';
import { z } from 'zod';
import { command } from '../define.ts';
import { absolutePath, listFolder, newStudyPath, saveCopy, startFolder } from '../study-files.ts';
import { text } from './schemas.ts';

const filePath = text(4_096);

/** New, Open and Save a copy, the recent studies and the folder listing behind them. */
export const studyCommands = {
  'study.recent': command(z.object({}), (s) => ({
    current: s.hasStudy ? s.study.path : null,
    studies: s.recent().map((file) => ({ path: file, exists: fs.existsSync(file) })),
  })),
  'study.listFolder': command(z.object({ path: filePath.optional() }), (s, input) =>
    listFolder(input.path ?? startFolder(s.hasStudy ? s.study.path : undefined)),
  ),
  'study.open': command(z.object({ path: filePath }), (s, input) => {
    s.open(absolutePath(input.path, 'open'));
    return { path: s.study.path };
  }),
  'study.create': command(
    z.object({ path: filePath, title: text(300).trim().min(1, 'a study needs a title') }),
    (s, input) => {
      s.create(newStudyPath(input.path, 'new study'), input.title);
      return { path: s.study.path };
    },
  ),
  'study.saveCopy': command(z.object({ path: filePath }), async (s, input) => {
    const study = s.study;
    return saveCopy(study.db, newStudyPath(input.path, 'save a copy'), s.addon);
  }),
};
