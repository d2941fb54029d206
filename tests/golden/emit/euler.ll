; saltpan kernel: fused exponential Euler step (next state, then every output)

; Function Attrs: nounwind
define void @saltpan_kernel_0(ptr noalias nocapture noundef readonly %y, ptr noalias nocapture noundef readonly %p, double %t, ptr noalias nocapture noundef writeonly %out) #0 {
entry:
  %0 = getelementptr inbounds double, ptr %y, i64 0
  %y0 = load double, ptr %0, align 8
  %1 = getelementptr inbounds double, ptr %p, i64 1
  %p1 = load double, ptr %1, align 8
  %2 = fadd double %y0, 4.000000e-02
  %3 = fneg double %2
  %4 = fdiv double %3, 1.000000e-02
  %5 = call double @expm1(double %4) #3
  %6 = fdiv double %5, %4
  %7 = fcmp oeq double %4, 0.000000e+00
  %8 = uitofp i1 %7 to double
  %9 = fcmp une double %8, 0.000000e+00
  %10 = select i1 %9, double 1.000000e+00, double %6
  %11 = fdiv double 1.000000e+03, %10
  %12 = fadd double %y0, 6.500000e-02
  %13 = fneg double %12
  %14 = fdiv double %13, 0x3F926E978D4FDF3C
  %15 = call double @llvm.exp.f64(double %14)
  %16 = fmul double 4.000000e+03, %15
  %17 = fadd double %11, %16
  %18 = fdiv double %11, %17
  %19 = fdiv double 1.000000e+00, %17
  %20 = getelementptr inbounds double, ptr %y, i64 1
  %y1 = load double, ptr %20, align 8
  %21 = fmul double %y1, %y1
  %22 = fmul double %21, %y1
  %23 = fdiv double %13, 2.000000e-02
  %24 = call double @llvm.exp.f64(double %23)
  %25 = fmul double 7.000000e+01, %24
  %26 = fadd double %y0, 3.500000e-02
  %27 = fdiv double %26, 1.000000e-02
  %28 = fneg double %27
  %29 = call double @llvm.exp.f64(double %28)
  %30 = fadd double 1.000000e+00, %29
  %31 = fdiv double 1.000000e+00, %30
  %32 = fmul double 1.000000e+03, %31
  %33 = fadd double %25, %32
  %34 = fdiv double %25, %33
  %35 = fdiv double 1.000000e+00, %33
  %36 = getelementptr inbounds double, ptr %y, i64 2
  %y2 = load double, ptr %36, align 8
  %37 = fmul double %22, %y2
  %38 = getelementptr inbounds double, ptr %p, i64 2
  %p2 = load double, ptr %38, align 8
  %39 = fmul double %p1, %37
  %40 = fmul double %39, %p2
  %41 = fsub double %y0, %p2
  %42 = fmul double %39, %41
  %43 = getelementptr inbounds double, ptr %p, i64 3
  %p3 = load double, ptr %43, align 8
  %44 = fadd double %y0, 5.500000e-02
  %45 = fneg double %44
  %46 = fdiv double %45, 1.000000e-02
  %47 = call double @expm1(double %46) #3
  %48 = fdiv double %47, %46
  %49 = fcmp oeq double %46, 0.000000e+00
  %50 = uitofp i1 %49 to double
  %51 = fcmp une double %50, 0.000000e+00
  %52 = select i1 %51, double 1.000000e+00, double %48
  %53 = fdiv double 1.000000e+02, %52
  %54 = fdiv double %13, 8.000000e-02
  %55 = call double @llvm.exp.f64(double %54)
  %56 = fmul double 1.250000e+02, %55
  %57 = fadd double %53, %56
  %58 = fdiv double %53, %57
  %59 = fdiv double 1.000000e+00, %57
  %60 = getelementptr inbounds double, ptr %y, i64 3
  %y3 = load double, ptr %60, align 8
  %61 = fmul double %y3, %y3
  %62 = fmul double %61, %y3
  %63 = fmul double %62, %y3
  %64 = getelementptr inbounds double, ptr %p, i64 4
  %p4 = load double, ptr %64, align 8
  %65 = fmul double %p3, %63
  %66 = fadd double %39, %65
  %67 = fmul double %65, %p4
  %68 = fadd double %40, %67
  %69 = fsub double %y0, %p4
  %70 = fmul double %65, %69
  %71 = getelementptr inbounds double, ptr %p, i64 5
  %p5 = load double, ptr %71, align 8
  %72 = getelementptr inbounds double, ptr %p, i64 6
  %p6 = load double, ptr %72, align 8
  %73 = fadd double %66, %p5
  %74 = fmul double %p5, %p6
  %75 = fadd double %68, %74
  %76 = fsub double %y0, %p6
  %77 = fmul double %p5, %76
  %78 = fcmp olt double %t, 2.000000e-01
  %79 = uitofp i1 %78 to double
  %80 = fcmp oge double %t, 0.000000e+00
  %81 = uitofp i1 %80 to double
  %82 = fcmp une double %79, 0.000000e+00
  %83 = fcmp une double %81, 0.000000e+00
  %84 = and i1 %83, %82
  %85 = uitofp i1 %84 to double
  %86 = fcmp une double %85, 0.000000e+00
  %87 = select i1 %86, double 0x3FB9999999999998, double 0.000000e+00
  %88 = fmul double %73, %y0
  %89 = fsub double %88, %75
  %90 = fsub double 0.000000e+00, %87
  %91 = fmul double 0x3EE4F8B588E368F0, %17
  %92 = fneg double %91
  %93 = call double @llvm.exp.f64(double %92)
  %94 = fsub double %y1, %18
  %95 = fmul double %94, %93
  %96 = fadd double %18, %95
  %97 = fmul double 0x3EE4F8B588E368F0, %33
  %98 = fneg double %97
  %99 = call double @llvm.exp.f64(double %98)
  %100 = fsub double %y2, %34
  %101 = fmul double %100, %99
  %102 = fadd double %34, %101
  %103 = fmul double 0x3EE4F8B588E368F0, %57
  %104 = fneg double %103
  %105 = call double @llvm.exp.f64(double %104)
  %106 = fsub double %y3, %58
  %107 = fmul double %106, %105
  %108 = fadd double %58, %107
  %109 = fadd double %t, 0x3ED4F8B588E368F0
  %110 = fmul double %96, %96
  %111 = fmul double %110, %96
  %112 = fmul double %111, %102
  %113 = fmul double %p1, %112
  %114 = fmul double %113, %p2
  %115 = fmul double %113, %41
  %116 = fmul double %108, %108
  %117 = fmul double %116, %108
  %118 = fmul double %117, %108
  %119 = fmul double %p3, %118
  %120 = fadd double %113, %119
  %121 = fmul double %119, %p4
  %122 = fadd double %114, %121
  %123 = fmul double %119, %69
  %124 = fadd double %120, %p5
  %125 = fadd double %122, %74
  %126 = fcmp olt double %109, 2.000000e-01
  %127 = uitofp i1 %126 to double
  %128 = fcmp oge double %109, 0.000000e+00
  %129 = uitofp i1 %128 to double
  %130 = fcmp une double %127, 0.000000e+00
  %131 = fcmp une double %129, 0.000000e+00
  %132 = and i1 %131, %130
  %133 = uitofp i1 %132 to double
  %134 = fcmp une double %133, 0.000000e+00
  %135 = select i1 %134, double 0x3FB9999999999998, double 0.000000e+00
  %136 = fmul double %124, %y0
  %137 = fsub double %136, %125
  %138 = fsub double 0.000000e+00, %135
  %139 = getelementptr inbounds double, ptr %p, i64 0
  %p0 = load double, ptr %139, align 8
  %140 = fsub double %125, %138
  %141 = fdiv double %140, %124
  %142 = fdiv double 0x3EE4F8B588E368F0, %p0
  %143 = fmul double %142, %124
  %144 = fneg double %143
  %145 = call double @llvm.exp.f64(double %144)
  %146 = fsub double %y0, %141
  %147 = fmul double %146, %145
  %148 = fadd double %141, %147
  %149 = fadd double %137, %138
  %150 = fmul double %142, %149
  %151 = fsub double %y0, %150
  %152 = fcmp ogt double %124, 0.000000e+00
  %153 = uitofp i1 %152 to double
  %154 = fcmp une double %153, 0.000000e+00
  %155 = select i1 %154, double %148, double %151
  %156 = getelementptr inbounds double, ptr %out, i64 0
  store double %155, ptr %156, align 8
  %157 = getelementptr inbounds double, ptr %out, i64 1
  store double %96, ptr %157, align 8
  %158 = getelementptr inbounds double, ptr %out, i64 2
  store double %102, ptr %158, align 8
  %159 = getelementptr inbounds double, ptr %out, i64 3
  store double %108, ptr %159, align 8
  %160 = getelementptr inbounds double, ptr %out, i64 4
  store double %18, ptr %160, align 8
  %161 = getelementptr inbounds double, ptr %out, i64 5
  store double %19, ptr %161, align 8
  %162 = getelementptr inbounds double, ptr %out, i64 6
  store double %34, ptr %162, align 8
  %163 = getelementptr inbounds double, ptr %out, i64 7
  store double %35, ptr %163, align 8
  %164 = getelementptr inbounds double, ptr %out, i64 8
  store double %39, ptr %164, align 8
  %165 = getelementptr inbounds double, ptr %out, i64 9
  store double %p2, ptr %165, align 8
  %166 = getelementptr inbounds double, ptr %out, i64 10
  store double %42, ptr %166, align 8
  %167 = getelementptr inbounds double, ptr %out, i64 11
  store double %58, ptr %167, align 8
  %168 = getelementptr inbounds double, ptr %out, i64 12
  store double %59, ptr %168, align 8
  %169 = getelementptr inbounds double, ptr %out, i64 13
  store double %65, ptr %169, align 8
  %170 = getelementptr inbounds double, ptr %out, i64 14
  store double %p4, ptr %170, align 8
  %171 = getelementptr inbounds double, ptr %out, i64 15
  store double %70, ptr %171, align 8
  %172 = getelementptr inbounds double, ptr %out, i64 16
  store double %p5, ptr %172, align 8
  %173 = getelementptr inbounds double, ptr %out, i64 17
  store double %p6, ptr %173, align 8
  %174 = getelementptr inbounds double, ptr %out, i64 18
  store double %77, ptr %174, align 8
  %175 = getelementptr inbounds double, ptr %out, i64 19
  store double %70, ptr %175, align 8
  %176 = getelementptr inbounds double, ptr %out, i64 20
  store double %42, ptr %176, align 8
  %177 = getelementptr inbounds double, ptr %out, i64 21
  store double %73, ptr %177, align 8
  %178 = getelementptr inbounds double, ptr %out, i64 22
  store double %75, ptr %178, align 8
  %179 = getelementptr inbounds double, ptr %out, i64 23
  store double %90, ptr %179, align 8
  %180 = getelementptr inbounds double, ptr %out, i64 24
  store double %87, ptr %180, align 8
  %181 = getelementptr inbounds double, ptr %out, i64 25
  store double %89, ptr %181, align 8
  %182 = getelementptr inbounds double, ptr %out, i64 26
  store double %87, ptr %182, align 8
  ret void
}

; Function Attrs: nounwind willreturn memory(none)
declare double @expm1(double) #1

; Function Attrs: nocallback nofree nosync nounwind speculatable willreturn memory(none)
declare double @llvm.exp.f64(double) #2

; saltpan kernel: fused exponential Euler step, next state only (steps between recordings)

; Function Attrs: nounwind
define void @saltpan_kernel_1(ptr noalias nocapture noundef readonly %y, ptr noalias nocapture noundef readonly %p, double %t, ptr noalias nocapture noundef writeonly %out) #0 {
entry:
  %0 = getelementptr inbounds double, ptr %y, i64 0
  %y0 = load double, ptr %0, align 8
  %1 = getelementptr inbounds double, ptr %p, i64 1
  %p1 = load double, ptr %1, align 8
  %2 = fadd double %y0, 4.000000e-02
  %3 = fneg double %2
  %4 = fdiv double %3, 1.000000e-02
  %5 = call double @expm1(double %4) #3
  %6 = fdiv double %5, %4
  %7 = fcmp oeq double %4, 0.000000e+00
  %8 = uitofp i1 %7 to double
  %9 = fcmp une double %8, 0.000000e+00
  %10 = select i1 %9, double 1.000000e+00, double %6
  %11 = fdiv double 1.000000e+03, %10
  %12 = fadd double %y0, 6.500000e-02
  %13 = fneg double %12
  %14 = fdiv double %13, 0x3F926E978D4FDF3C
  %15 = call double @llvm.exp.f64(double %14)
  %16 = fmul double 4.000000e+03, %15
  %17 = fadd double %11, %16
  %18 = fdiv double %11, %17
  %19 = fdiv double 1.000000e+00, %17
  %20 = getelementptr inbounds double, ptr %y, i64 1
  %y1 = load double, ptr %20, align 8
  %21 = fmul double %y1, %y1
  %22 = fmul double %21, %y1
  %23 = fdiv double %13, 2.000000e-02
  %24 = call double @llvm.exp.f64(double %23)
  %25 = fmul double 7.000000e+01, %24
  %26 = fadd double %y0, 3.500000e-02
  %27 = fdiv double %26, 1.000000e-02
  %28 = fneg double %27
  %29 = call double @llvm.exp.f64(double %28)
  %30 = fadd double 1.000000e+00, %29
  %31 = fdiv double 1.000000e+00, %30
  %32 = fmul double 1.000000e+03, %31
  %33 = fadd double %25, %32
  %34 = fdiv double %25, %33
  %35 = fdiv double 1.000000e+00, %33
  %36 = getelementptr inbounds double, ptr %y, i64 2
  %y2 = load double, ptr %36, align 8
  %37 = fmul double %22, %y2
  %38 = getelementptr inbounds double, ptr %p, i64 2
  %p2 = load double, ptr %38, align 8
  %39 = fmul double %p1, %37
  %40 = fmul double %39, %p2
  %41 = fsub double %y0, %p2
  %42 = fmul double %39, %41
  %43 = getelementptr inbounds double, ptr %p, i64 3
  %p3 = load double, ptr %43, align 8
  %44 = fadd double %y0, 5.500000e-02
  %45 = fneg double %44
  %46 = fdiv double %45, 1.000000e-02
  %47 = call double @expm1(double %46) #3
  %48 = fdiv double %47, %46
  %49 = fcmp oeq double %46, 0.000000e+00
  %50 = uitofp i1 %49 to double
  %51 = fcmp une double %50, 0.000000e+00
  %52 = select i1 %51, double 1.000000e+00, double %48
  %53 = fdiv double 1.000000e+02, %52
  %54 = fdiv double %13, 8.000000e-02
  %55 = call double @llvm.exp.f64(double %54)
  %56 = fmul double 1.250000e+02, %55
  %57 = fadd double %53, %56
  %58 = fdiv double %53, %57
  %59 = fdiv double 1.000000e+00, %57
  %60 = getelementptr inbounds double, ptr %y, i64 3
  %y3 = load double, ptr %60, align 8
  %61 = fmul double %y3, %y3
  %62 = fmul double %61, %y3
  %63 = fmul double %62, %y3
  %64 = getelementptr inbounds double, ptr %p, i64 4
  %p4 = load double, ptr %64, align 8
  %65 = fmul double %p3, %63
  %66 = fadd double %39, %65
  %67 = fmul double %65, %p4
  %68 = fadd double %40, %67
  %69 = fsub double %y0, %p4
  %70 = fmul double %65, %69
  %71 = getelementptr inbounds double, ptr %p, i64 5
  %p5 = load double, ptr %71, align 8
  %72 = getelementptr inbounds double, ptr %p, i64 6
  %p6 = load double, ptr %72, align 8
  %73 = fadd double %66, %p5
  %74 = fmul double %p5, %p6
  %75 = fadd double %68, %74
  %76 = fsub double %y0, %p6
  %77 = fmul double %p5, %76
  %78 = fcmp olt double %t, 2.000000e-01
  %79 = uitofp i1 %78 to double
  %80 = fcmp oge double %t, 0.000000e+00
  %81 = uitofp i1 %80 to double
  %82 = fcmp une double %79, 0.000000e+00
  %83 = fcmp une double %81, 0.000000e+00
  %84 = and i1 %83, %82
  %85 = uitofp i1 %84 to double
  %86 = fcmp une double %85, 0.000000e+00
  %87 = select i1 %86, double 0x3FB9999999999998, double 0.000000e+00
  %88 = fmul double %73, %y0
  %89 = fsub double %88, %75
  %90 = fsub double 0.000000e+00, %87
  %91 = fmul double 0x3EE4F8B588E368F0, %17
  %92 = fneg double %91
  %93 = call double @llvm.exp.f64(double %92)
  %94 = fsub double %y1, %18
  %95 = fmul double %94, %93
  %96 = fadd double %18, %95
  %97 = fmul double 0x3EE4F8B588E368F0, %33
  %98 = fneg double %97
  %99 = call double @llvm.exp.f64(double %98)
  %100 = fsub double %y2, %34
  %101 = fmul double %100, %99
  %102 = fadd double %34, %101
  %103 = fmul double 0x3EE4F8B588E368F0, %57
  %104 = fneg double %103
  %105 = call double @llvm.exp.f64(double %104)
  %106 = fsub double %y3, %58
  %107 = fmul double %106, %105
  %108 = fadd double %58, %107
  %109 = fadd double %t, 0x3ED4F8B588E368F0
  %110 = fmul double %96, %96
  %111 = fmul double %110, %96
  %112 = fmul double %111, %102
  %113 = fmul double %p1, %112
  %114 = fmul double %113, %p2
  %115 = fmul double %113, %41
  %116 = fmul double %108, %108
  %117 = fmul double %116, %108
  %118 = fmul double %117, %108
  %119 = fmul double %p3, %118
  %120 = fadd double %113, %119
  %121 = fmul double %119, %p4
  %122 = fadd double %114, %121
  %123 = fmul double %119, %69
  %124 = fadd double %120, %p5
  %125 = fadd double %122, %74
  %126 = fcmp olt double %109, 2.000000e-01
  %127 = uitofp i1 %126 to double
  %128 = fcmp oge double %109, 0.000000e+00
  %129 = uitofp i1 %128 to double
  %130 = fcmp une double %127, 0.000000e+00
  %131 = fcmp une double %129, 0.000000e+00
  %132 = and i1 %131, %130
  %133 = uitofp i1 %132 to double
  %134 = fcmp une double %133, 0.000000e+00
  %135 = select i1 %134, double 0x3FB9999999999998, double 0.000000e+00
  %136 = fmul double %124, %y0
  %137 = fsub double %136, %125
  %138 = fsub double 0.000000e+00, %135
  %139 = getelementptr inbounds double, ptr %p, i64 0
  %p0 = load double, ptr %139, align 8
  %140 = fsub double %125, %138
  %141 = fdiv double %140, %124
  %142 = fdiv double 0x3EE4F8B588E368F0, %p0
  %143 = fmul double %142, %124
  %144 = fneg double %143
  %145 = call double @llvm.exp.f64(double %144)
  %146 = fsub double %y0, %141
  %147 = fmul double %146, %145
  %148 = fadd double %141, %147
  %149 = fadd double %137, %138
  %150 = fmul double %142, %149
  %151 = fsub double %y0, %150
  %152 = fcmp ogt double %124, 0.000000e+00
  %153 = uitofp i1 %152 to double
  %154 = fcmp une double %153, 0.000000e+00
  %155 = select i1 %154, double %148, double %151
  %156 = getelementptr inbounds double, ptr %out, i64 0
  store double %155, ptr %156, align 8
  %157 = getelementptr inbounds double, ptr %out, i64 1
  store double %96, ptr %157, align 8
  %158 = getelementptr inbounds double, ptr %out, i64 2
  store double %102, ptr %158, align 8
  %159 = getelementptr inbounds double, ptr %out, i64 3
  store double %108, ptr %159, align 8
  ret void
}

; Function Attrs: nounwind willreturn memory(none)
declare double @expm1(double) #1

; Function Attrs: nocallback nofree nosync nounwind speculatable willreturn memory(none)
declare double @llvm.exp.f64(double) #2

; saltpan kernel: model kernel (steps that meet a stimulus edge)

; Function Attrs: nounwind
define void @saltpan_kernel_2(ptr noalias nocapture noundef readonly %y, ptr noalias nocapture noundef readonly %p, double %t, ptr noalias nocapture noundef writeonly %out) #0 {
entry:
  %0 = getelementptr inbounds double, ptr %y, i64 0
  %y0 = load double, ptr %0, align 8
  %1 = getelementptr inbounds double, ptr %p, i64 1
  %p1 = load double, ptr %1, align 8
  %2 = fadd double %y0, 4.000000e-02
  %3 = fneg double %2
  %4 = fdiv double %3, 1.000000e-02
  %5 = call double @expm1(double %4) #3
  %6 = fdiv double %5, %4
  %7 = fcmp oeq double %4, 0.000000e+00
  %8 = uitofp i1 %7 to double
  %9 = fcmp une double %8, 0.000000e+00
  %10 = select i1 %9, double 1.000000e+00, double %6
  %11 = fdiv double 1.000000e+03, %10
  %12 = fadd double %y0, 6.500000e-02
  %13 = fneg double %12
  %14 = fdiv double %13, 0x3F926E978D4FDF3C
  %15 = call double @llvm.exp.f64(double %14)
  %16 = fmul double 4.000000e+03, %15
  %17 = fadd double %11, %16
  %18 = fdiv double %11, %17
  %19 = fdiv double 1.000000e+00, %17
  %20 = getelementptr inbounds double, ptr %y, i64 1
  %y1 = load double, ptr %20, align 8
  %21 = fmul double %y1, %y1
  %22 = fmul double %21, %y1
  %23 = fdiv double %13, 2.000000e-02
  %24 = call double @llvm.exp.f64(double %23)
  %25 = fmul double 7.000000e+01, %24
  %26 = fadd double %y0, 3.500000e-02
  %27 = fdiv double %26, 1.000000e-02
  %28 = fneg double %27
  %29 = call double @llvm.exp.f64(double %28)
  %30 = fadd double 1.000000e+00, %29
  %31 = fdiv double 1.000000e+00, %30
  %32 = fmul double 1.000000e+03, %31
  %33 = fadd double %25, %32
  %34 = fdiv double %25, %33
  %35 = fdiv double 1.000000e+00, %33
  %36 = getelementptr inbounds double, ptr %y, i64 2
  %y2 = load double, ptr %36, align 8
  %37 = fmul double %22, %y2
  %38 = getelementptr inbounds double, ptr %p, i64 2
  %p2 = load double, ptr %38, align 8
  %39 = fmul double %p1, %37
  %40 = fmul double %39, %p2
  %41 = fsub double %y0, %p2
  %42 = fmul double %39, %41
  %43 = getelementptr inbounds double, ptr %p, i64 3
  %p3 = load double, ptr %43, align 8
  %44 = fadd double %y0, 5.500000e-02
  %45 = fneg double %44
  %46 = fdiv double %45, 1.000000e-02
  %47 = call double @expm1(double %46) #3
  %48 = fdiv double %47, %46
  %49 = fcmp oeq double %46, 0.000000e+00
  %50 = uitofp i1 %49 to double
  %51 = fcmp une double %50, 0.000000e+00
  %52 = select i1 %51, double 1.000000e+00, double %48
  %53 = fdiv double 1.000000e+02, %52
  %54 = fdiv double %13, 8.000000e-02
  %55 = call double @llvm.exp.f64(double %54)
  %56 = fmul double 1.250000e+02, %55
  %57 = fadd double %53, %56
  %58 = fdiv double %53, %57
  %59 = fdiv double 1.000000e+00, %57
  %60 = getelementptr inbounds double, ptr %y, i64 3
  %y3 = load double, ptr %60, align 8
  %61 = fmul double %y3, %y3
  %62 = fmul double %61, %y3
  %63 = fmul double %62, %y3
  %64 = getelementptr inbounds double, ptr %p, i64 4
  %p4 = load double, ptr %64, align 8
  %65 = fmul double %p3, %63
  %66 = fadd double %39, %65
  %67 = fmul double %65, %p4
  %68 = fadd double %40, %67
  %69 = fsub double %y0, %p4
  %70 = fmul double %65, %69
  %71 = getelementptr inbounds double, ptr %p, i64 5
  %p5 = load double, ptr %71, align 8
  %72 = getelementptr inbounds double, ptr %p, i64 6
  %p6 = load double, ptr %72, align 8
  %73 = fadd double %66, %p5
  %74 = fmul double %p5, %p6
  %75 = fadd double %68, %74
  %76 = fsub double %y0, %p6
  %77 = fmul double %p5, %76
  %78 = fcmp olt double %t, 2.000000e-01
  %79 = uitofp i1 %78 to double
  %80 = fcmp oge double %t, 0.000000e+00
  %81 = uitofp i1 %80 to double
  %82 = fcmp une double %79, 0.000000e+00
  %83 = fcmp une double %81, 0.000000e+00
  %84 = and i1 %83, %82
  %85 = uitofp i1 %84 to double
  %86 = fcmp une double %85, 0.000000e+00
  %87 = select i1 %86, double 0x3FB9999999999998, double 0.000000e+00
  %88 = fmul double %73, %y0
  %89 = fsub double %88, %75
  %90 = fsub double 0.000000e+00, %87
  %91 = getelementptr inbounds double, ptr %out, i64 0
  store double %18, ptr %91, align 8
  %92 = getelementptr inbounds double, ptr %out, i64 1
  store double %19, ptr %92, align 8
  %93 = getelementptr inbounds double, ptr %out, i64 2
  store double %34, ptr %93, align 8
  %94 = getelementptr inbounds double, ptr %out, i64 3
  store double %35, ptr %94, align 8
  %95 = getelementptr inbounds double, ptr %out, i64 4
  store double %39, ptr %95, align 8
  %96 = getelementptr inbounds double, ptr %out, i64 5
  store double %p2, ptr %96, align 8
  %97 = getelementptr inbounds double, ptr %out, i64 6
  store double %42, ptr %97, align 8
  %98 = getelementptr inbounds double, ptr %out, i64 7
  store double %58, ptr %98, align 8
  %99 = getelementptr inbounds double, ptr %out, i64 8
  store double %59, ptr %99, align 8
  %100 = getelementptr inbounds double, ptr %out, i64 9
  store double %65, ptr %100, align 8
  %101 = getelementptr inbounds double, ptr %out, i64 10
  store double %p4, ptr %101, align 8
  %102 = getelementptr inbounds double, ptr %out, i64 11
  store double %70, ptr %102, align 8
  %103 = getelementptr inbounds double, ptr %out, i64 12
  store double %p5, ptr %103, align 8
  %104 = getelementptr inbounds double, ptr %out, i64 13
  store double %p6, ptr %104, align 8
  %105 = getelementptr inbounds double, ptr %out, i64 14
  store double %77, ptr %105, align 8
  %106 = getelementptr inbounds double, ptr %out, i64 15
  store double %70, ptr %106, align 8
  %107 = getelementptr inbounds double, ptr %out, i64 16
  store double %42, ptr %107, align 8
  %108 = getelementptr inbounds double, ptr %out, i64 17
  store double %73, ptr %108, align 8
  %109 = getelementptr inbounds double, ptr %out, i64 18
  store double %75, ptr %109, align 8
  %110 = getelementptr inbounds double, ptr %out, i64 19
  store double %90, ptr %110, align 8
  %111 = getelementptr inbounds double, ptr %out, i64 20
  store double %87, ptr %111, align 8
  %112 = getelementptr inbounds double, ptr %out, i64 21
  store double %89, ptr %112, align 8
  %113 = getelementptr inbounds double, ptr %out, i64 22
  store double %87, ptr %113, align 8
  ret void
}

; Function Attrs: nounwind willreturn memory(none)
declare double @expm1(double) #1

; Function Attrs: nocallback nofree nosync nounwind speculatable willreturn memory(none)
declare double @llvm.exp.f64(double) #2

