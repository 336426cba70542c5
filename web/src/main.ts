import { bootstrapApplication } from '@angular/platform-browser';
import { App } from './app/app';
import { appConfig } from './app/app.config';
import { applyStoredTheme } from './app/core/shell/theme';

applyStoredTheme();
// Started in a task of its own: evaluating the first script and starting the app are each well under
// 50 ms, but together they kept the page's only thread busy longer than that on a cold load.
setTimeout(() => bootstrapApplication(App, appConfig).catch((err: unknown) => console.error(err)));
