// Counts what a person does in the console: each click, each field typed into, each choice from a
// list and each file uploaded is one action. Waiting and reading are not actions.
import type { Locator } from 'playwright-core';

export class ActionCounter {
  readonly log: string[] = [];

  get count() {
    return this.log.length;
  }

  private record(kind: string, what: string) {
    this.log.push(`${kind} ${what}`);
  }

  async click(target: Locator, what: string) {
    await target.click();
    this.record('click', what);
  }

  async type(target: Locator, text: string, what: string) {
    await target.fill(text);
    this.record('type', what);
  }

  async select(target: Locator, value: string, what: string) {
    await target.selectOption(value);
    this.record('select', what);
  }

  async upload(target: Locator, file: string, what: string) {
    await target.setInputFiles(file);
    this.record('upload', what);
  }
}
