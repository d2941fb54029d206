// CodeGen.cpp - Stage 7: IR kernel -> LLVM module.
//
// Every IR node becomes exactly one LLVM value, in node order, so the IR's sharing of common
// subexpressions carries over unchanged; O3 (in JIT.cpp) does the rest.
#include "CodeGen.h"

#include <llvm/IR/IRBuilder.h>
#include <llvm/IR/Intrinsics.h>
#include <llvm/IR/LLVMContext.h>
#include <llvm/IR/Module.h>

#include <vector>

namespace brine {
namespace {

class KernelEmitter {
public:
  KernelEmitter(const ir::Kernel &kernel, llvm::Module &module)
      : kernel_(kernel), module_(module), builder_(module.getContext()),
        double_(llvm::Type::getDoubleTy(module.getContext())) {}

  bool emit(const std::string &name);

private:
  llvm::Value *emitNode(const ir::Node &n);
  llvm::Value *load(llvm::Value *base, int index, const char *name);
  llvm::Value *truth(llvm::Value *v); // v != 0 (unordered, so NaN is true)
  llvm::Value *toDouble(llvm::Value *flag) { return builder_.CreateUIToFP(flag, double_); }
  llvm::Value *libmCall(const char *name, llvm::Value *arg);

  const ir::Kernel &kernel_;
  llvm::Module &module_;
  llvm::IRBuilder<> builder_;
  llvm::Type *double_;
  llvm::Value *y_ = nullptr, *p_ = nullptr, *t_ = nullptr;
  std::vector<llvm::Value *> values_;
};

bool KernelEmitter::emit(const std::string &name) {
  const auto &nodes = kernel_.nodes();
  // The IR promises dependency order; check it so a bad kernel cannot make us read garbage.
  for (size_t i = 0; i < nodes.size(); ++i) {
    const ir::Node &n = nodes[i];
    int count = ir::arity(n.op);
    const ir::NodeId operands[3] = {n.a, n.b, n.c};
    for (int k = 0; k < count; ++k)
      if (operands[k] < 0 || static_cast<size_t>(operands[k]) >= i)
        return false;
    if ((n.op == ir::Op::State || n.op == ir::Op::Param) && n.index < 0)
      return false;
  }
  for (ir::NodeId o : kernel_.outputs)
    if (o < 0 || static_cast<size_t>(o) >= nodes.size())
      return false;

  llvm::LLVMContext &ctx = module_.getContext();
  llvm::Type *ptr = llvm::PointerType::getUnqual(ctx);
  auto *type = llvm::FunctionType::get(llvm::Type::getVoidTy(ctx), {ptr, ptr, double_, ptr}, false);
  auto *fn = llvm::Function::Create(type, llvm::Function::ExternalLinkage, name, module_);
  fn->setCallingConv(llvm::CallingConv::C);
  fn->setDoesNotThrow();
  for (unsigned arg : {0u, 1u, 3u}) {
    fn->addParamAttr(arg, llvm::Attribute::NoAlias);
    fn->addParamAttr(arg, llvm::Attribute::NoCapture);
    fn->addParamAttr(arg, llvm::Attribute::NoUndef);
  }
  fn->addParamAttr(0, llvm::Attribute::ReadOnly);
  fn->addParamAttr(1, llvm::Attribute::ReadOnly);
  fn->addParamAttr(3, llvm::Attribute::WriteOnly);
  y_ = fn->getArg(0);
  p_ = fn->getArg(1);
  t_ = fn->getArg(2);
  fn->getArg(3)->setName("out");
  y_->setName("y");
  p_->setName("p");
  t_->setName("t");

  builder_.SetInsertPoint(llvm::BasicBlock::Create(ctx, "entry", fn));
  // Strict IEEE arithmetic, no FMA contraction: native code then computes exactly what the
  // reference interpreter computes, bit for bit, and the two can be compared to 1e-12.
  builder_.clearFastMathFlags();

  values_.reserve(nodes.size());
  for (const ir::Node &n : nodes)
    values_.push_back(emitNode(n));
  for (size_t i = 0; i < kernel_.outputs.size(); ++i) {
    llvm::Value *slot = builder_.CreateConstInBoundsGEP1_64(double_, fn->getArg(3), i);
    builder_.CreateStore(values_[kernel_.outputs[i]], slot);
  }
  builder_.CreateRetVoid();
  return true;
}

llvm::Value *KernelEmitter::load(llvm::Value *base, int index, const char *name) {
  llvm::Value *slot = builder_.CreateConstInBoundsGEP1_64(double_, base, static_cast<uint64_t>(index));
  return builder_.CreateLoad(double_, slot, name + std::to_string(index));
}

llvm::Value *KernelEmitter::truth(llvm::Value *v) {
  return builder_.CreateFCmpUNE(v, llvm::ConstantFP::get(double_, 0.0));
}

llvm::Value *KernelEmitter::libmCall(const char *name, llvm::Value *arg) {
  llvm::FunctionCallee callee = module_.getOrInsertFunction(name, double_, double_);
  if (auto *f = llvm::dyn_cast<llvm::Function>(callee.getCallee())) {
    // Pure like the intrinsics (as with -fno-math-errno), so O3 may hoist, share or vectorise it.
    f->setDoesNotAccessMemory();
    f->setDoesNotThrow();
    f->setWillReturn();
  }
  llvm::CallInst *call = builder_.CreateCall(callee, {arg});
  call->setDoesNotThrow();
  call->setDoesNotAccessMemory();
  return call;
}

llvm::Value *KernelEmitter::emitNode(const ir::Node &n) {
  using ir::Op;
  auto a = [&] { return values_[n.a]; };
  auto b = [&] { return values_[n.b]; };
  switch (n.op) {
  case Op::Const: return llvm::ConstantFP::get(double_, n.constant);
  case Op::State: return load(y_, n.index, "y");
  case Op::Param: return load(p_, n.index, "p");
  case Op::Time: return t_;
  case Op::Add: return builder_.CreateFAdd(a(), b());
  case Op::Sub: return builder_.CreateFSub(a(), b());
  case Op::Mul: return builder_.CreateFMul(a(), b());
  case Op::Div: return builder_.CreateFDiv(a(), b());
  case Op::Neg: return builder_.CreateFNeg(a());
  case Op::Pow: return builder_.CreateBinaryIntrinsic(llvm::Intrinsic::pow, a(), b());
  case Op::Exp: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::exp, a());
  case Op::Expm1: return libmCall("expm1", a());
  case Op::Log: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::log, a());
  case Op::Log10: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::log10, a());
  case Op::Sqrt: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::sqrt, a());
  case Op::Abs: return builder_.CreateUnaryIntrinsic(llvm::Intrinsic::fabs, a());
  // minnum/maxnum are fmin/fmax: a NaN operand yields the other operand.
  case Op::Min: return builder_.CreateBinaryIntrinsic(llvm::Intrinsic::minnum, a(), b());
  case Op::Max: return builder_.CreateBinaryIntrinsic(llvm::Intrinsic::maxnum, a(), b());
  case Op::Tanh: return libmCall("tanh", a());
  // Ordered compares are false on NaN, like C++ <, <=, >, >=, ==; != is unordered (true on NaN).
  case Op::Lt: return toDouble(builder_.CreateFCmpOLT(a(), b()));
  case Op::Le: return toDouble(builder_.CreateFCmpOLE(a(), b()));
  case Op::Gt: return toDouble(builder_.CreateFCmpOGT(a(), b()));
  case Op::Ge: return toDouble(builder_.CreateFCmpOGE(a(), b()));
  case Op::Eq: return toDouble(builder_.CreateFCmpOEQ(a(), b()));
  case Op::Ne: return toDouble(builder_.CreateFCmpUNE(a(), b()));
  case Op::And: return toDouble(builder_.CreateAnd(truth(a()), truth(b())));
  case Op::Or: return toDouble(builder_.CreateOr(truth(a()), truth(b())));
  case Op::Not: return toDouble(builder_.CreateNot(truth(a())));
  // Both arms are already computed (straight-line IR), so a select costs no branch.
  case Op::Select: return builder_.CreateSelect(truth(a()), b(), values_[n.c]);
  }
  return nullptr; // unreachable: the switch covers IR.def
}

} // namespace

std::unique_ptr<llvm::Module> codegen(const ir::Kernel &kernel, llvm::LLVMContext &ctx,
                                      const std::string &functionName) {
  auto module = std::make_unique<llvm::Module>(functionName, ctx);
  if (!KernelEmitter(kernel, *module).emit(functionName))
    return nullptr;
  return module;
}

} // namespace brine
