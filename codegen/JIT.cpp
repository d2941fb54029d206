// JIT.cpp - Stage 9a: an LLJIT for the host CPU that optimises (O3) and runs CodeGen's modules.
//
// One of the two files that see LLVM headers (with CodeGen.cpp); JIT.h shows no LLVM type.
#include "JIT.h"

#include "CodeGen.h"

#include <llvm/Analysis/TargetLibraryInfo.h>
#include <llvm/ExecutionEngine/Orc/Core.h>
#include <llvm/ExecutionEngine/Orc/ExecutionUtils.h>
#include <llvm/ExecutionEngine/Orc/JITTargetMachineBuilder.h>
#include <llvm/ExecutionEngine/Orc/LLJIT.h>
#include <llvm/IR/LLVMContext.h>
#include <llvm/IR/Module.h>
#include <llvm/IR/Verifier.h>
#include <llvm/Passes/PassBuilder.h>
#include <llvm/Support/TargetSelect.h>
#include <llvm/Support/raw_ostream.h>
#include <llvm/Target/TargetMachine.h>

#include <cmath>
#include <mutex>

namespace saltpan {

struct JIT::Impl {
  std::unique_ptr<llvm::orc::LLJIT> jit;
  std::unique_ptr<llvm::TargetMachine> machine; // drives O3's cost model; LLJIT has its own copy
  unsigned counter = 0;
  std::string lastIR, lastUnoptimisedIR;
};

namespace {

std::string describe(llvm::Error e) { return llvm::toString(std::move(e)); }

/// The libm functions generated code may call, registered by address so the JIT never depends
/// on what the executable happens to export.
llvm::Error defineLibm(llvm::orc::LLJIT &jit) {
  using Unary = double (*)(double);
  using Binary = double (*)(double, double);
  struct Entry {
    const char *name;
    void *address;
  };
  const Entry entries[] = {
      {"exp", reinterpret_cast<void *>(static_cast<Unary>(::exp))},
      {"expm1", reinterpret_cast<void *>(static_cast<Unary>(::expm1))},
      {"log", reinterpret_cast<void *>(static_cast<Unary>(::log))},
      {"log10", reinterpret_cast<void *>(static_cast<Unary>(::log10))},
      {"sqrt", reinterpret_cast<void *>(static_cast<Unary>(::sqrt))},
      {"tanh", reinterpret_cast<void *>(static_cast<Unary>(::tanh))},
      {"pow", reinterpret_cast<void *>(static_cast<Binary>(::pow))},
      {"fmin", reinterpret_cast<void *>(static_cast<Binary>(::fmin))},
      {"fmax", reinterpret_cast<void *>(static_cast<Binary>(::fmax))},
  };
  llvm::orc::SymbolMap symbols;
  for (const Entry &e : entries)
    symbols[jit.mangleAndIntern(e.name)] = {llvm::orc::ExecutorAddr::fromPtr(e.address),
                                            llvm::JITSymbolFlags::Exported | llvm::JITSymbolFlags::Callable};
  return jit.getMainJITDylib().define(llvm::orc::absoluteSymbols(std::move(symbols)));
}

} // namespace

namespace {

void optimizeModule(llvm::Module &module, llvm::TargetMachine &machine) {
  llvm::LoopAnalysisManager lam;
  llvm::FunctionAnalysisManager fam;
  llvm::CGSCCAnalysisManager cgam;
  llvm::ModuleAnalysisManager mam;
  llvm::PassBuilder builder(&machine);
  llvm::TargetLibraryInfoImpl tlii(machine.getTargetTriple()); // no vector library registered
  fam.registerPass([&] { return llvm::TargetLibraryAnalysis(tlii); });
  builder.registerModuleAnalyses(mam);
  builder.registerCGSCCAnalyses(cgam);
  builder.registerFunctionAnalyses(fam);
  builder.registerLoopAnalyses(lam);
  builder.crossRegisterProxies(lam, fam, cgam, mam);
  builder.buildPerModuleDefaultPipeline(llvm::OptimizationLevel::O3).run(module, mam);
}

} // namespace

std::unique_ptr<llvm::orc::JITTargetMachineBuilder> hostTarget(std::string &error) {
  static std::once_flag once;
  std::call_once(once, [] {
    llvm::InitializeNativeTarget();
    llvm::InitializeNativeTargetAsmPrinter();
  });
  auto builder = llvm::orc::JITTargetMachineBuilder::detectHost(); // host CPU name and features
  if (!builder) {
    error = "cannot target this machine: " + describe(builder.takeError());
    return nullptr;
  }
  builder->setCodeGenOptLevel(llvm::CodeGenOptLevel::Aggressive);
  builder->setCodeModel(llvm::CodeModel::Small); // JITLink handles it; the default is Large
  builder->setRelocationModel(llvm::Reloc::PIC_);
  return std::make_unique<llvm::orc::JITTargetMachineBuilder>(std::move(*builder));
}

std::unique_ptr<llvm::Module> prepareKernelModule(const ir::Kernel &kernel, llvm::LLVMContext &ctx,
                                                  const std::string &name, int lanes, llvm::TargetMachine &machine,
                                                  std::string *unoptimised, std::string &error) {
  std::unique_ptr<llvm::Module> module = codegen(kernel, ctx, name, lanes);
  if (!module) {
    error = "malformed kernel: an operand or output names no earlier node";
    return nullptr;
  }
  module->setTargetTriple(machine.getTargetTriple().str());
  module->setDataLayout(machine.createDataLayout());
  std::string problems;
  llvm::raw_string_ostream problemStream(problems);
  if (llvm::verifyModule(*module, &problemStream)) {
    error = "codegen produced invalid LLVM IR: " + problemStream.str();
    return nullptr;
  }
  // Per-function CPU attributes make every pass see the same target as the code generator.
  if (llvm::Function *fn = module->getFunction(name)) {
    fn->addFnAttr("target-cpu", machine.getTargetCPU());
    fn->addFnAttr("target-features", machine.getTargetFeatureString());
    // Keep whole vectors in registers, as libmvec's _ZGVdN4v_exp (ymm) and _ZGVeN8v_exp (zmm)
    // expect them; without this a CPU that prefers 256-bit vectors splits <8 x double>.
    if (lanes > 1) {
      std::string bits = std::to_string(64 * lanes);
      fn->addFnAttr("min-legal-vector-width", bits);
      fn->addFnAttr("prefer-vector-width", bits);
    }
  }
  if (unoptimised) {
    unoptimised->clear();
    llvm::raw_string_ostream rawStream(*unoptimised);
    module->print(rawStream, nullptr);
  }
  optimizeModule(*module, machine);
  return module;
}

JIT::JIT(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
JIT::~JIT() = default;

std::unique_ptr<JIT> JIT::create(std::string &error) {
  std::unique_ptr<llvm::orc::JITTargetMachineBuilder> builder = hostTarget(error);
  if (!builder)
    return nullptr;

  auto impl = std::make_unique<Impl>();
  auto machine = builder->createTargetMachine();
  if (!machine) {
    error = "cannot create a target machine: " + describe(machine.takeError());
    return nullptr;
  }
  impl->machine = std::move(*machine);

  auto jit = llvm::orc::LLJITBuilder().setJITTargetMachineBuilder(std::move(*builder)).create();
  if (!jit) {
    error = "cannot create the JIT: " + describe(jit.takeError());
    return nullptr;
  }
  impl->jit = std::move(*jit);
  llvm::orc::JITDylib &main = impl->jit->getMainJITDylib();
  if (llvm::Error e = defineLibm(*impl->jit)) {
    error = "cannot register libm: " + describe(std::move(e));
    return nullptr;
  }
  // The vector variants (_ZGVdN4v_exp, ...) come from libmvec, loaded by name.
  auto libmvec =
      llvm::orc::DynamicLibrarySearchGenerator::Load("libmvec.so.1", impl->jit->getDataLayout().getGlobalPrefix());
  if (!libmvec) {
    error = "cannot load libmvec.so.1: " + describe(libmvec.takeError());
    return nullptr;
  }
  main.addGenerator(std::move(*libmvec));
  return std::unique_ptr<JIT>(new JIT(std::move(impl)));
}

KernelFn JIT::compile(const ir::Kernel &kernel, std::string &error) { return compileLanes(kernel, 1, error); }

int JIT::nativeLanes() const {
  std::string features = impl_->machine->getTargetFeatureString().str() + ",";
  if (features.find("+avx512f,") != std::string::npos)
    return 8;
  if (features.find("+avx2,") != std::string::npos)
    return 4;
  return 2;
}

KernelFn JIT::compileLanes(const ir::Kernel &kernel, int lanes, std::string &error) {
  Impl &impl = *impl_;
  if (lanes > nativeLanes()) {
    error = "this CPU's vectors hold at most " + std::to_string(nativeLanes()) + " lanes, not " + std::to_string(lanes);
    return nullptr;
  }
  std::string name = "saltpan_kernel_" + std::to_string(impl.counter++);
  auto context = std::make_unique<llvm::LLVMContext>();
  std::unique_ptr<llvm::Module> module =
      prepareKernelModule(kernel, *context, name, lanes, *impl.machine, &impl.lastUnoptimisedIR, error);
  if (!module)
    return nullptr;
  impl.lastIR.clear();
  llvm::raw_string_ostream irStream(impl.lastIR);
  module->print(irStream, nullptr);
  irStream.flush();

  if (llvm::Error e = impl.jit->addIRModule(llvm::orc::ThreadSafeModule(std::move(module), std::move(context)))) {
    error = "cannot add the kernel: " + describe(std::move(e));
    return nullptr;
  }
  auto address = impl.jit->lookup(name);
  if (!address) {
    error = "cannot compile the kernel: " + describe(address.takeError());
    return nullptr;
  }
  return address->toPtr<KernelFn>();
}

const std::string &JIT::lastIR() const { return impl_->lastIR; }
const std::string &JIT::lastUnoptimisedIR() const { return impl_->lastUnoptimisedIR; }

} // namespace saltpan
