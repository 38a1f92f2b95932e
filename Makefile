# sitereach: one Makefile, no configure step.
#   make            build build/sitereach (installs missing Debian packages first)
#   make demo       generate the invented demo district and run the main job on it
#   make check      build and run every test (unit, CLI, cross-checks)
#   make asan       the same tests under AddressSanitizer + UndefinedBehaviorSanitizer
#   make bench      benchmarks (prints figures; never part of check)
#   make install PREFIX=/usr/local
# Set WERROR=1 (CI does) to turn warnings into errors.

PKGS     := igraph gdal libcjson proj cairo fontconfig libcrypto
CC       ?= cc
BUILD    ?= build
PREFIX   ?= /usr/local
VERSION  := 0.1.0

# Install what is missing before asking pkg-config (fresh machines).
DEPS_OK := $(shell pkg-config --exists $(PKGS) 2>/dev/null && test -f /usr/include/glpk.h && echo yes)
ifneq ($(DEPS_OK),yes)
  $(info sitereach: some build dependencies are missing; running tools/install-deps.sh)
  $(shell ./tools/install-deps.sh >&2)
endif

WARN     := -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes
ifeq ($(WERROR),1)
  WARN += -Werror
endif
OPT      ?= -O2 -g
SANFLAGS ?=
CFLAGS   += $(SANFLAGS) -std=c11 -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE $(OPT) $(WARN) \
            -Iinclude -Isrc -DSITEREACH_VERSION='"$(VERSION)"' \
            $(shell pkg-config --cflags $(PKGS))
LDFLAGS  += $(SANFLAGS)
LDLIBS   += $(shell pkg-config --libs $(PKGS)) -lglpk -lm -lpthread

SAN      := -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined

LIB_SRC  := $(sort $(filter-out src/cmd/%,$(wildcard src/*/*.c)))
CMD_SRC  := $(sort $(wildcard src/cmd/*.c))
TEST_SRC := $(sort $(wildcard tests/test_*.c))
TOOL_SRC := $(sort $(wildcard tools/*.c))
SUPPORT_SRC := $(sort $(wildcard tests/support/*.c))
TOOL_SUPPORT_SRC := $(sort $(wildcard tools/support/*.c))

LIB_OBJ  := $(LIB_SRC:%.c=$(BUILD)/%.o)
CMD_OBJ  := $(CMD_SRC:%.c=$(BUILD)/%.o)
TESTS    := $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)
TOOLS    := $(TOOL_SRC:tools/%.c=$(BUILD)/tools/%)
SUPPORT_OBJ := $(SUPPORT_SRC:%.c=$(BUILD)/%.o)
TOOL_SUPPORT_OBJ := $(TOOL_SUPPORT_SRC:%.c=$(BUILD)/%.o)
LIBA     := $(BUILD)/libsitereach.a
BIN      := $(BUILD)/sitereach

.PHONY: all demo check tests asan bench bench-orlib install clean deps
.DELETE_ON_ERROR:

all: $(BIN) $(TOOLS)

deps:
	./tools/install-deps.sh

$(BUILD)/%.o: %.c
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -MMD -MP -c $< -o $@

$(LIBA): $(LIB_OBJ)
	@mkdir -p $(dir $@)
	rm -f $@
	ar rcs $@ $^

$(BIN): $(CMD_OBJ) $(LIBA)
	$(CC) $(CFLAGS) $(LDFLAGS) -o $@ $^ $(LDLIBS)

# Shared test builders (tests/support) are linked into every test.
$(BUILD)/tests/support/%.o: tests/support/%.c
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -Itests/support -MMD -MP -c $< -o $@

$(BUILD)/tests/%: tests/%.c tests/check.h $(SUPPORT_OBJ) $(LIBA)
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -Itests -Itests/support $(LDFLAGS) -o $@ $< $(SUPPORT_OBJ) $(LIBA) $(LDLIBS)

# Shared benchmark builders (tools/support) are linked into every tool.
$(BUILD)/tools/support/%.o: tools/support/%.c
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -Itools/support -MMD -MP -c $< -o $@

$(BUILD)/tools/%: tools/%.c $(TOOL_SUPPORT_OBJ) $(LIBA)
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -Itools/support $(LDFLAGS) -o $@ $< $(TOOL_SUPPORT_OBJ) $(LIBA) $(LDLIBS)

tests: $(BIN) $(TESTS) $(TOOLS)

# The demo district is generated (deterministic from its seed), never committed.
DEMO_DIR := scenarios/demo
$(DEMO_DIR)/scenario.json: $(BUILD)/tools/gen-demo
	$(BUILD)/tools/gen-demo --seed 7 --out $(DEMO_DIR)

demo: $(BIN) $(DEMO_DIR)/scenario.json
	./tools/demo.sh $(BIN) $(DEMO_DIR) out/demo

check: tests $(DEMO_DIR)/scenario.json
	./tests/run.sh $(BUILD)

asan: $(DEMO_DIR)/scenario.json
	$(MAKE) BUILD=build-asan OPT='-O1 -g' SANFLAGS='$(SAN)' tests
	ASAN_OPTIONS=detect_leaks=1 UBSAN_OPTIONS=print_stacktrace=1 \
	    ./tests/run.sh build-asan --no-xcheck

bench: $(BIN) $(TOOLS)
	./tools/bench.sh $(BUILD)

bench-orlib: $(BIN) $(TESTS)
	./tools/bench-orlib.sh $(BUILD)

install: $(BIN)
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/man/man1 \
	    $(DESTDIR)$(PREFIX)/share/bash-completion/completions
	install -m 755 $(BIN) $(DESTDIR)$(PREFIX)/bin/sitereach
	if [ -f docs/sitereach.1 ]; then install -m 644 docs/sitereach.1 $(DESTDIR)$(PREFIX)/share/man/man1/; fi
	if [ -f tools/sitereach.bash ]; then install -m 644 tools/sitereach.bash \
	    $(DESTDIR)$(PREFIX)/share/bash-completion/completions/sitereach; fi

clean:
	rm -rf build build-asan out

# The shared test and bench objects are kept between builds (not intermediates).
.SECONDARY: $(SUPPORT_OBJ) $(TOOL_SUPPORT_OBJ)

-include $(LIB_OBJ:.o=.d) $(CMD_OBJ:.o=.d) $(SUPPORT_OBJ:.o=.d) $(TOOL_SUPPORT_OBJ:.o=.d)
