// Site jobs (temporary minimal version while the foundation is proven).
export class Jobs {
  constructor(ctx) { this.ctx = ctx; }
  markDirty() {}
  markSaved() {}
  markSaveFailed(err) { console.warn(err); }
  async saveEntryInputs() {}
  showBar() {}
  show() {}
}
