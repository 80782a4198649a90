-- CreateIndex
CREATE INDEX "Trial_runId_idx" ON "Trial"("runId");
