// EmitObject.cpp - kernels and the model bundle as one relocatable object file (`saltpan build`).
//
// Why an object file with data in it, rather than generated C: the runtime archives and this
// one object are all the link needs, so `saltpan build` runs no C++ compiler of its own and the
// kernels are the very machine code the JIT would run (same passes, same target machine).
#include "EmitObject.h"

#include "CodeGen.h"
#include "ModelFile.h"
#include "StandaloneModel.h"

#include <llvm/ExecutionEngine/Orc/JITTargetMachineBuilder.h>
#include <llvm/IR/Constants.h>
#include <llvm/IR/LLVMContext.h>
#include <llvm/IR/LegacyPassManager.h>
#include <llvm/IR/Module.h>
#include <llvm/Linker/Linker.h>
#include <llvm/Support/FileSystem.h>
#include <llvm/Support/raw_ostream.h>
#include <llvm/Target/TargetMachine.h>

namespace saltpan {
namespace {

std::string describe(llvm::Error e) { return llvm::toString(std::move(e)); }

// The target machine the JIT creates (CodeGen.h's hostTarget).
std::unique_ptr<llvm::TargetMachine> hostMachine(std::string &error) {
  std::unique_ptr<llvm::orc::JITTargetMachineBuilder> builder = hostTarget(error);
  if (!builder)
    return nullptr;
  auto machine = builder->createTargetMachine();
  if (!machine) {
    error = "cannot create a target machine: " + describe(machine.takeError());
    return nullptr;
  }
  return std::move(*machine);
}

llvm::GlobalVariable *hiddenConstant(llvm::Module &module, llvm::Constant *value, const char *name) {
  auto *global =
      new llvm::GlobalVariable(module, value->getType(), true, llvm::GlobalValue::ExternalLinkage, value, name);
  global->setVisibility(llvm::GlobalValue::HiddenVisibility);
  return global;
}

} // namespace

bool emitModelObject(const std::vector<EmittedKernel> &kernels, const std::string &bundleText, const std::string &path,
                     std::string &error) {
  std::unique_ptr<llvm::TargetMachine> machine = hostMachine(error);
  if (!machine)
    return false;
  llvm::LLVMContext ctx;
  auto module = std::make_unique<llvm::Module>("saltpan_model", ctx);
  module->setTargetTriple(machine->getTargetTriple().str());
  module->setDataLayout(machine->createDataLayout());

  std::vector<std::pair<uint64_t, std::string>> table;
  for (size_t i = 0; i < kernels.size(); ++i) {
    std::string name = "saltpan_model_kernel_" + std::to_string(i);
    // Each kernel is prepared alone, as the JIT prepares it, before it joins the others.
    std::unique_ptr<llvm::Module> kernelModule =
        prepareKernelModule(*kernels[i].kernel, ctx, name, kernels[i].lanes, *machine, nullptr, error);
    if (!kernelModule)
      return false;
    if (llvm::Linker::linkModules(*module, std::move(kernelModule))) {
      error = "cannot link kernel " + std::to_string(i) + " into the object";
      return false;
    }
    table.emplace_back(kernelFingerprint(*kernels[i].kernel, kernels[i].lanes), name);
  }

  llvm::Type *i64 = llvm::Type::getInt64Ty(ctx);
  llvm::Type *ptr = llvm::PointerType::getUnqual(ctx);
  auto *rowType = llvm::StructType::get(ctx, {i64, ptr});
  std::vector<llvm::Constant *> rows;
  for (const auto &[fingerprint, name] : table) {
    llvm::Function *fn = module->getFunction(name);
    fn->setVisibility(llvm::GlobalValue::HiddenVisibility);
    rows.push_back(llvm::ConstantStruct::get(rowType, {llvm::ConstantInt::get(i64, fingerprint), fn}));
  }
  hiddenConstant(*module, llvm::ConstantArray::get(llvm::ArrayType::get(rowType, rows.size()), rows),
                 embeddedKernelsSymbol);
  hiddenConstant(*module, llvm::ConstantInt::get(i64, rows.size()), embeddedKernelCountSymbol);
  hiddenConstant(*module, llvm::ConstantDataArray::getString(ctx, bundleText, true), embeddedModelSymbol);
  hiddenConstant(*module, llvm::ConstantInt::get(i64, bundleText.size()), embeddedModelSizeSymbol);

  std::error_code ec;
  llvm::raw_fd_ostream out(path, ec, llvm::sys::fs::OF_None);
  if (ec) {
    error = "cannot create '" + path + "': " + ec.message();
    return false;
  }
  llvm::legacy::PassManager passes;
  if (machine->addPassesToEmitFile(passes, out, nullptr, llvm::CodeGenFileType::ObjectFile)) {
    error = "this target cannot emit object files";
    return false;
  }
  passes.run(*module);
  out.flush();
  if (out.has_error()) {
    error = "cannot write '" + path + "'";
    out.clear_error();
    return false;
  }
  return true;
}

} // namespace saltpan
