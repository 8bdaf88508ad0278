# broadline: the two commands are `make run` (workbench on the built-in demo)
# and `make test` (every test). Both install what they need first.
GO      ?= go
BIN     := bin/broadline
# Packages without cgo run under the race detector, the workbench's core,
# commands and figures too; the GUI and main packages (fyne, cgo) run
# without it, since a race build recompiles the C parts (~4 min).
# HEAVY are the injection–recovery fits, skipped under the race detector
# (which slows the synthesis some twentyfold) and run once without it.
HEAVY   := TestFitRecovers|TestFitKeepsInnerZone|TestInjectionRecovery|TestJointBeatsSingle|TestSampleDeterministic|TestFitCommand$$|TestReadmeExamples
PURE    := ./physics/... ./internal/... ./linelists/... ./spectra/... ./opacity/... ./tools/... ./app/core/... ./app/cli/... ./app/figure/... ./grid/...
export LANG ?= en_US.UTF-8

.PHONY: all deps build headless run test bench fmt screenshot clean

all: build

deps:
	@scripts/deps.sh

build: deps
	$(GO) build -o $(BIN) ./app

# headless: the commands without the workbench (no cgo, no X11), for
# cluster nodes.
headless:
	CGO_ENABLED=0 $(GO) build -tags nogui -o bin/broadline-headless ./app

run: build
	./$(BIN)

# test also needs poppler-utils: app/figure reads its exported PDFs back with
# pdftotext and pdftoppm.
test:
	@scripts/deps.sh poppler-utils
	@test -z "$$(gofmt -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go'))" || { echo "gofmt needed on:"; gofmt -l .; exit 1; }
	$(GO) vet ./...
	$(GO) test -race -timeout 15m $(PURE)
	$(GO) test -timeout 10m -run '$(HEAVY)' ./opacity/fit/ ./app/core/ ./app/cli/
	$(GO) test -timeout 10m ./app ./app/gui/...

bench: deps
	$(GO) test -run '^$$' -bench . -benchmem ./...

fmt:
	gofmt -w $$(git ls-files '*.go')

# screenshot: run the workbench under Xvfb on the walkthrough's session (the late demo epoch
# with the Nd knock-out) and save shot.png (needs xvfb, xauth, imagemagick).
screenshot: build
	@scripts/deps.sh xvfb xauth imagemagick
	scripts/screenshot.sh $(BIN) shot.png 12 open docs/late-epoch-knockout.session.json

clean:
	rm -rf bin shot.png
