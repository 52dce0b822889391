-- CreateTable
CREATE TABLE "Organisation" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "name" TEXT NOT NULL,
    "emergencyPhone" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP
);

-- CreateTable
CREATE TABLE "Site" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "address" TEXT NOT NULL DEFAULT '',
    "jurisdiction" TEXT NOT NULL DEFAULT 'US',
    "rulebookId" TEXT NOT NULL DEFAULT 'us-federal',
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "unitSystem" TEXT NOT NULL DEFAULT 'kg',
    "isConsumerExempt" BOOLEAN NOT NULL DEFAULT false,
    "depositRuleId" TEXT,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" REAL NOT NULL DEFAULT 0,
    "leadKg" REAL NOT NULL DEFAULT 0,
    "electrolyteKg" REAL NOT NULL DEFAULT 0,
    "acidKg" REAL NOT NULL DEFAULT 0,
    "peakYear" INTEGER NOT NULL DEFAULT 0,
    "peakBatteryKg" REAL NOT NULL DEFAULT 0,
    "depositBalanceCents" INTEGER NOT NULL DEFAULT 0,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Site_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Bay" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" REAL NOT NULL DEFAULT 0,
    "leadKg" REAL NOT NULL DEFAULT 0,
    "electrolyteKg" REAL NOT NULL DEFAULT 0,
    "acidKg" REAL NOT NULL DEFAULT 0,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Bay_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Container" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "bayId" TEXT,
    "labelNumber" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "isClosed" BOOLEAN NOT NULL DEFAULT false,
    "state" TEXT NOT NULL DEFAULT 'open',
    "accumulationStart" DATETIME,
    "sealedAt" DATETIME,
    "loadId" TEXT,
    "unitCount" INTEGER NOT NULL DEFAULT 0,
    "batteryKg" REAL NOT NULL DEFAULT 0,
    "leadKg" REAL NOT NULL DEFAULT 0,
    "electrolyteKg" REAL NOT NULL DEFAULT 0,
    "acidKg" REAL NOT NULL DEFAULT 0,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Container_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Container_bayId_fkey" FOREIGN KEY ("bayId") REFERENCES "Bay" ("id") ON DELETE SET NULL ON UPDATE CASCADE,
    CONSTRAINT "Container_loadId_fkey" FOREIGN KEY ("loadId") REFERENCES "Load" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Unit" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "containerId" TEXT,
    "kind" TEXT NOT NULL,
    "nominalVoltage" INTEGER NOT NULL,
    "capacityAh" REAL,
    "cca" INTEGER,
    "groupSize" TEXT,
    "weightKg" REAL,
    "condition" TEXT NOT NULL,
    "source" TEXT NOT NULL,
    "state" TEXT NOT NULL DEFAULT 'received',
    "saleRef" TEXT,
    "note" TEXT,
    "receivedAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "receivedBy" TEXT NOT NULL,
    "method" TEXT NOT NULL,
    "batteryKg" REAL NOT NULL,
    "batteryKgLow" REAL NOT NULL,
    "batteryKgHigh" REAL NOT NULL,
    "leadKg" REAL NOT NULL,
    "leadKgLow" REAL NOT NULL,
    "leadKgHigh" REAL NOT NULL,
    "electrolyteKg" REAL NOT NULL,
    "electrolyteKgLow" REAL NOT NULL,
    "electrolyteKgHigh" REAL NOT NULL,
    "acidKg" REAL NOT NULL,
    "acidKgLow" REAL NOT NULL,
    "acidKgHigh" REAL NOT NULL,
    "polymerKg" REAL NOT NULL,
    "otherKg" REAL NOT NULL,
    CONSTRAINT "Unit_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Unit_containerId_fkey" FOREIGN KEY ("containerId") REFERENCES "Container" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Lot" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "containerId" TEXT,
    "ticketNumber" TEXT NOT NULL,
    "grossKg" REAL NOT NULL,
    "tareKg" REAL NOT NULL,
    "netKg" REAL NOT NULL,
    "unitCount" INTEGER NOT NULL,
    "mix" TEXT NOT NULL,
    "state" TEXT NOT NULL DEFAULT 'received',
    "receivedAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "receivedBy" TEXT NOT NULL,
    "leadKg" REAL NOT NULL,
    "leadKgLow" REAL NOT NULL,
    "leadKgHigh" REAL NOT NULL,
    "electrolyteKg" REAL NOT NULL,
    "electrolyteKgLow" REAL NOT NULL,
    "electrolyteKgHigh" REAL NOT NULL,
    "acidKg" REAL NOT NULL,
    "acidKgLow" REAL NOT NULL,
    "acidKgHigh" REAL NOT NULL,
    CONSTRAINT "Lot_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Lot_containerId_fkey" FOREIGN KEY ("containerId") REFERENCES "Container" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "LevelChange" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "at" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "reason" TEXT NOT NULL,
    "refId" TEXT,
    "unitCount" INTEGER NOT NULL,
    "batteryKg" REAL NOT NULL,
    "leadKg" REAL NOT NULL,
    "electrolyteKg" REAL NOT NULL,
    "acidKg" REAL NOT NULL,
    CONSTRAINT "LevelChange_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "CustomRule" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "title" TEXT NOT NULL,
    "metric" TEXT NOT NULL,
    "threshold" REAL NOT NULL,
    "unit" TEXT NOT NULL,
    "warningPct" REAL NOT NULL DEFAULT 80,
    "citation" TEXT NOT NULL,
    "caution" TEXT NOT NULL DEFAULT '',
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "CustomRule_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Facility" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "address" TEXT NOT NULL,
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "tolerancePct" REAL NOT NULL DEFAULT 2,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Facility_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Carrier" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "organisationId" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "address" TEXT NOT NULL DEFAULT '',
    "regulatoryIds" TEXT NOT NULL DEFAULT '',
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Carrier_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Load" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "facilityId" TEXT NOT NULL,
    "carrierId" TEXT,
    "reference" TEXT NOT NULL,
    "vehicle" TEXT NOT NULL DEFAULT '',
    "state" TEXT NOT NULL DEFAULT 'planning',
    "basis" TEXT,
    "checklist" TEXT NOT NULL DEFAULT '{}',
    "departureScaleKg" REAL,
    "departedAt" DATETIME,
    "receivedKg" REAL,
    "receivedAt" DATETIME,
    "reconciledAt" DATETIME,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Load_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Load_facilityId_fkey" FOREIGN KEY ("facilityId") REFERENCES "Facility" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "Load_carrierId_fkey" FOREIGN KEY ("carrierId") REFERENCES "Carrier" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Document" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "loadId" TEXT,
    "kind" TEXT NOT NULL,
    "rulebookId" TEXT NOT NULL,
    "rulebookVersion" TEXT NOT NULL,
    "input" TEXT NOT NULL,
    "sha256" TEXT NOT NULL,
    "issuedAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "issuedBy" TEXT NOT NULL,
    CONSTRAINT "Document_loadId_fkey" FOREIGN KEY ("loadId") REFERENCES "Load" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "Sale" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "saleRef" TEXT NOT NULL,
    "soldAt" DATETIME NOT NULL,
    "product" TEXT NOT NULL,
    "groupSize" TEXT NOT NULL DEFAULT '',
    "quantity" INTEGER NOT NULL,
    "depositCents" INTEGER NOT NULL,
    "importId" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    CONSTRAINT "Sale_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "DepositEntry" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "siteId" TEXT NOT NULL,
    "kind" TEXT NOT NULL,
    "amountCents" INTEGER NOT NULL,
    "saleRef" TEXT NOT NULL,
    "unitId" TEXT,
    "at" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "createdBy" TEXT NOT NULL,
    CONSTRAINT "DepositEntry_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "TrailEvent" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "organisationId" TEXT NOT NULL,
    "siteId" TEXT,
    "at" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "actor" TEXT NOT NULL,
    "actorLabel" TEXT NOT NULL,
    "action" TEXT NOT NULL,
    "entity" TEXT NOT NULL,
    "entityId" TEXT NOT NULL,
    "before" TEXT,
    "after" TEXT
);

-- CreateTable
CREATE TABLE "IdempotencyKey" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "scope" TEXT NOT NULL,
    "key" TEXT NOT NULL,
    "status" INTEGER NOT NULL,
    "body" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP
);

-- CreateTable
CREATE TABLE "Membership" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "userId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    CONSTRAINT "Membership_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user" ("id") ON DELETE CASCADE ON UPDATE CASCADE,
    CONSTRAINT "Membership_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "ApiKey" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "organisationId" TEXT NOT NULL,
    "siteId" TEXT NOT NULL,
    "role" TEXT NOT NULL,
    "name" TEXT NOT NULL,
    "prefix" TEXT NOT NULL,
    "hash" TEXT NOT NULL,
    "createdBy" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "lastUsedAt" DATETIME,
    "revokedAt" DATETIME,
    CONSTRAINT "ApiKey_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation" ("id") ON DELETE RESTRICT ON UPDATE CASCADE,
    CONSTRAINT "ApiKey_siteId_fkey" FOREIGN KEY ("siteId") REFERENCES "Site" ("id") ON DELETE RESTRICT ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "user" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "name" TEXT NOT NULL,
    "email" TEXT NOT NULL,
    "emailVerified" BOOLEAN NOT NULL DEFAULT false,
    "image" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL,
    "organisationId" TEXT,
    CONSTRAINT "user_organisationId_fkey" FOREIGN KEY ("organisationId") REFERENCES "Organisation" ("id") ON DELETE SET NULL ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "session" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "expiresAt" DATETIME NOT NULL,
    "token" TEXT NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL,
    "ipAddress" TEXT,
    "userAgent" TEXT,
    "userId" TEXT NOT NULL,
    CONSTRAINT "session_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "account" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "accountId" TEXT NOT NULL,
    "providerId" TEXT NOT NULL,
    "userId" TEXT NOT NULL,
    "accessToken" TEXT,
    "refreshToken" TEXT,
    "idToken" TEXT,
    "accessTokenExpiresAt" DATETIME,
    "refreshTokenExpiresAt" DATETIME,
    "scope" TEXT,
    "password" TEXT,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL,
    CONSTRAINT "account_userId_fkey" FOREIGN KEY ("userId") REFERENCES "user" ("id") ON DELETE CASCADE ON UPDATE CASCADE
);

-- CreateTable
CREATE TABLE "verification" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "identifier" TEXT NOT NULL,
    "value" TEXT NOT NULL,
    "expiresAt" DATETIME NOT NULL,
    "createdAt" DATETIME NOT NULL DEFAULT CURRENT_TIMESTAMP,
    "updatedAt" DATETIME NOT NULL
);

-- CreateTable
CREATE TABLE "rateLimit" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "key" TEXT NOT NULL,
    "count" INTEGER NOT NULL,
    "lastRequest" BIGINT NOT NULL
);

-- CreateIndex
CREATE INDEX "Site_organisationId_idx" ON "Site"("organisationId");

-- CreateIndex
CREATE UNIQUE INDEX "Bay_siteId_name_key" ON "Bay"("siteId", "name");

-- CreateIndex
CREATE INDEX "Container_siteId_state_idx" ON "Container"("siteId", "state");

-- CreateIndex
CREATE INDEX "Container_loadId_idx" ON "Container"("loadId");

-- CreateIndex
CREATE UNIQUE INDEX "Container_siteId_labelNumber_key" ON "Container"("siteId", "labelNumber");

-- CreateIndex
CREATE INDEX "Unit_siteId_receivedAt_idx" ON "Unit"("siteId", "receivedAt");

-- CreateIndex
CREATE INDEX "Unit_containerId_idx" ON "Unit"("containerId");

-- CreateIndex
CREATE INDEX "Unit_siteId_state_idx" ON "Unit"("siteId", "state");

-- CreateIndex
CREATE INDEX "Lot_containerId_idx" ON "Lot"("containerId");

-- CreateIndex
CREATE UNIQUE INDEX "Lot_siteId_ticketNumber_key" ON "Lot"("siteId", "ticketNumber");

-- CreateIndex
CREATE INDEX "LevelChange_siteId_at_idx" ON "LevelChange"("siteId", "at");

-- CreateIndex
CREATE INDEX "Load_siteId_state_idx" ON "Load"("siteId", "state");

-- CreateIndex
CREATE UNIQUE INDEX "Load_siteId_reference_key" ON "Load"("siteId", "reference");

-- CreateIndex
CREATE INDEX "Document_siteId_kind_idx" ON "Document"("siteId", "kind");

-- CreateIndex
CREATE INDEX "Document_loadId_idx" ON "Document"("loadId");

-- CreateIndex
CREATE INDEX "Sale_siteId_soldAt_idx" ON "Sale"("siteId", "soldAt");

-- CreateIndex
CREATE UNIQUE INDEX "Sale_siteId_saleRef_key" ON "Sale"("siteId", "saleRef");

-- CreateIndex
CREATE INDEX "DepositEntry_siteId_at_idx" ON "DepositEntry"("siteId", "at");

-- CreateIndex
CREATE INDEX "DepositEntry_siteId_saleRef_idx" ON "DepositEntry"("siteId", "saleRef");

-- CreateIndex
CREATE INDEX "TrailEvent_organisationId_at_idx" ON "TrailEvent"("organisationId", "at");

-- CreateIndex
CREATE INDEX "TrailEvent_siteId_at_idx" ON "TrailEvent"("siteId", "at");

-- CreateIndex
CREATE INDEX "TrailEvent_entity_entityId_idx" ON "TrailEvent"("entity", "entityId");

-- CreateIndex
CREATE UNIQUE INDEX "IdempotencyKey_scope_key_key" ON "IdempotencyKey"("scope", "key");

-- CreateIndex
CREATE UNIQUE INDEX "Membership_userId_siteId_key" ON "Membership"("userId", "siteId");

-- CreateIndex
CREATE UNIQUE INDEX "ApiKey_hash_key" ON "ApiKey"("hash");

-- CreateIndex
CREATE UNIQUE INDEX "user_email_key" ON "user"("email");

-- CreateIndex
CREATE UNIQUE INDEX "session_token_key" ON "session"("token");

-- CreateIndex
CREATE INDEX "session_userId_idx" ON "session"("userId");

-- CreateIndex
CREATE INDEX "account_userId_idx" ON "account"("userId");

-- CreateIndex
CREATE INDEX "verification_identifier_idx" ON "verification"("identifier");

-- CreateIndex
CREATE UNIQUE INDEX "rateLimit_key_key" ON "rateLimit"("key");

-- Hand-written (not in the Prisma model): trail events are append-only. The database itself
-- refuses to change or remove one, whatever the code above it does.
CREATE TRIGGER "TrailEvent_refuse_update" BEFORE UPDATE ON "TrailEvent"
BEGIN
    SELECT RAISE(ABORT, 'trail events are append-only');
END;

CREATE TRIGGER "TrailEvent_refuse_delete" BEFORE DELETE ON "TrailEvent"
BEGIN
    SELECT RAISE(ABORT, 'trail events are append-only');
END;
